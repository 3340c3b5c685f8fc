"""The byte path of the TIN reader gives exactly what the iterparse path gives.

The reference is the iterparse path (lxml parsing every element), itself
checked against matplotlib in ``test_ground.py``; the shared real-world
terrain files are read both ways too.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gradeline.errors import InputError
from gradeline.io import surface_reader as R

REALWORLD = Path(__file__).resolve().parents[2] / "shared" / "realworld"

HEAD = (
    '<?xml version="1.0"?>\n<LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2">'
    '<Units><Metric linearUnit="meter"/></Units>\n<Surfaces>\n'
)


def _file(points: str, faces: str, extra: str = "", head: str = HEAD) -> str:
    return (
        f'{head}<Surface name="S"><Definition surfType="TIN">\n<Pnts>{points}</Pnts>\n'
        f"<Faces>{faces}</Faces></Definition></Surface>{extra}\n</Surfaces></LandXML>\n"
    )


PTS = '<P id="1">0 0 1</P>\n<P id="2">0 10 2</P>\n<P id="3">10 0 3</P>\n<P id="4">10 10 4</P>\n'
FACES = '<F>1 2 3</F>\n<F i="1">2 4 3</F>\n'


def _outcome(fn):
    try:
        got = fn()
    except InputError as err:
        return "error", str(err)
    return "ok", got


def _same(a, b) -> bool:
    if a[0] != b[0]:
        return False
    if a[0] == "error":
        return a[1] == b[1]
    if [n for n, _ in a[1]] != [n for n, _ in b[1]]:
        return False
    for (_, da), (_, db) in zip(a[1], b[1], strict=True):
        if (da is None) != (db is None):
            return False
        if da is None:
            continue
        for key, va in da.items():
            vb = db[key]
            if isinstance(va, np.ndarray):
                if va.dtype != vb.dtype or not np.array_equal(va, vb):
                    return False
            elif va != vb:
                return False
    return True


def _both(path, want=None):
    """(whether the byte path read it, its outcome, the iterparse outcome)."""
    try:
        fast = _outcome(lambda: R._plain_surfaces(str(path), want, False))
        plain = True
    except R._NotPlain:
        fast, plain = _outcome(lambda: R._surfaces(str(path), want, False)), False
    slow = _outcome(lambda: list(R._iter_surfaces(str(path), want, False)))
    return plain, fast, slow


CASES = {
    # name: (points, faces, extra, is the byte path expected to read it)
    "plain": (PTS, FACES, "", True),
    "face attributes": (PTS, '<F n="0 1 3" b="1">1 2 3</F><F M="6" i="1">2 4 3</F>', "", True),
    "exponent coordinates": (PTS.replace("0 10 2", "0e0 1.0E1 2"), FACES, "", True),
    "ids written 5.0": (PTS.replace('id="4"', 'id="4.0"'), FACES, "", True),
    "ids out of order": (PTS.replace('id="1"', 'id="9"'), FACES.replace("1 2", "9 2"), "", True),
    "hidden written i=0": (PTS, '<F i="0">1 2 3</F>', "", False),
    "comment in a block": (PTS + "<!-- x -->", FACES, "", False),
    "CDATA in a block": (PTS, FACES + "<![CDATA[ ]]>", "", False),
    "character reference": (PTS.replace("0 10 2", "0 1&#48; 2"), FACES, "", False),
    "single quotes": (PTS.replace('id="2"', "id='2'"), FACES, "", False),
    "point attributes": (PTS.replace('id="2"', 'id="2" code="x"'), FACES, "", False),
    "two values": (PTS.replace("0 10 2", "0 10"), FACES, "", False),
    "four values": (PTS.replace("0 10 2", "0 10 2 7"), FACES, "", False),
    "compensating counts": (
        PTS.replace("0 10 2", "0 10").replace("10 0 3", "10 0 3 8"),
        FACES,
        "",
        False,
    ),
    "text between items": (PTS.replace('</P>\n<P id="3">', '</P>5<P id="3">'), FACES, "", False),
    "non-finite": (PTS.replace("0 10 2", "0 nan 2"), FACES, "", False),
    "missing point": (PTS, FACES.replace("2 4 3", "2 4 7"), "", True),
    "duplicate id": (PTS.replace('id="4"', 'id="3"'), FACES.replace("2 4 3", "1 3 2"), "", True),
    "negative id": (PTS.replace('id="1"', 'id="-1"'), FACES.replace("1 2", "-1 2"), "", False),
    "face of two ids": (PTS, "<F>1 2</F>", "", False),
    "faces with decimals": (PTS, "<F>1 2 3.0</F>", "", False),
    "prefixed items": (PTS.replace("<P ", "<lx:P ").replace("</P>", "</lx:P>"), FACES, "", False),
    "block with attribute": (PTS, FACES, "", False),
    "second surface": (
        PTS,
        FACES,
        '<Surface name="T"><Definition><Pnts><P id="1">1 1 1</P></Pnts><Faces/></Definition>'
        "</Surface>",
        True,
    ),
    "malformed": (PTS.replace('</P>\n<P id="3">', '</P>\n<P id="3">>'), FACES, "", False),
    "unclosed block": (PTS + "<P id='9'>1 1 1", FACES, "", False),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_byte_path_matches_iterparse(tmp_path, case):
    pts, faces, extra, plain_expected = CASES[case]
    path = tmp_path / "s.xml"
    text = _file(pts, faces, extra)
    if case == "block with attribute":
        text = text.replace("<Faces>", '<Faces desc="x">')
    path.write_text(text)
    for want in ("S", "T", None):
        plain, fast, slow = _both(path, want)
        assert _same(fast, slow), (case, want, fast, slow)
    assert plain is plain_expected, case  # with every surface read


def test_line_numbers_and_doctype(tmp_path):
    path = tmp_path / "l.xml"
    path.write_text(_file(PTS, FACES.replace("2 4 3", "2 4 7")))
    with pytest.raises(InputError) as err:
        R.read_surface(path)
    assert err.value.source.line == 4  # the Surface element
    doc = _file(
        PTS, FACES, head='<?xml version="1.0"?>\n<!DOCTYPE x [<!ENTITY a "1">]>' + HEAD[22:]
    )
    path.write_text(doc)
    with pytest.raises(InputError, match="DOCTYPE"):
        R.read_surface(path)


@settings(max_examples=30, deadline=None)
@given(chunk=st.integers(7, 200), cut=st.integers(0, 3))
def test_any_chunk_boundary(tmp_path_factory, chunk, cut):
    # a chunk boundary may fall anywhere: inside a tag, a number or a block's end
    rng = np.random.default_rng(chunk)
    n = 40
    pts = "".join(
        f'<P id="{i + 1}">{rng.uniform(0, 100):.4f} {rng.uniform(0, 100):.4f} {i}</P>\r\n'
        for i in range(n)
    )
    faces = "".join(
        ('<F i="1">' if k % 7 == cut else '<F n="1 2 3">' if k % 5 == 0 else "<F>")
        + f"{k % n + 1} {(k + 1) % n + 1} {(k + 5) % n + 1}</F>\n"
        for k in range(60)
    )
    path = tmp_path_factory.mktemp("c") / "c.xml"
    path.write_text(_file(pts, faces))
    old = R._CHUNK
    R._CHUNK = chunk
    try:
        plain, fast, slow = _both(path)
    finally:
        R._CHUNK = old
    assert plain and _same(fast, slow)


@pytest.mark.skipif(not REALWORLD.is_dir(), reason="the shared real-world files are not here")
@pytest.mark.parametrize("name", ["im_m3_terrain.xml", "lx2gltf_subdivision_v20.xml"])
def test_real_world_terrain_both_ways(name):
    plain, fast, slow = _both(REALWORLD / name)
    assert plain and fast[0] == "ok" and _same(fast, slow)
    surfaces = [d for _, d in fast[1] if d is not None]
    assert surfaces and all(len(d["faces"]) > 1000 for d in surfaces)


def test_surface_names_skip_the_blocks(tmp_path):
    path = tmp_path / "n.xml"
    extra = '<Surface name="T"><Definition><Pnts>garbage</Pnts></Definition></Surface>'
    path.write_text(_file(PTS, FACES, extra))
    assert R.surface_names(path) == ["S", "T"]
