"""Reading LandXML: samples, namespaces, encodings, units and safe parsing."""

from __future__ import annotations

import pytest

from gradeline.errors import InputError
from gradeline.io import landxml
from tests.conftest import METRIC_SAMPLE, US_SAMPLE

MINIMAL = """<?xml version="1.0" encoding="{enc}"?>
<LandXML {ns} version="1.2">
  <Units><Imperial linearUnit="foot" angularUnit="decimal degrees" directionUnit="decimal degrees"/></Units>
  <Alignments>
    <Alignment name="{name}" staStart="0" length="1000">
      <Profile name="P">
        <ProfAlign name="FG">
          <PVI>0 100</PVI>
          <ParaCurve length="400">500 110</ParaCurve>
          <PVI>1000 105</PVI>
        </ProfAlign>
      </Profile>
    </Alignment>
  </Alignments>
</LandXML>
"""


def doc_bytes(enc="UTF-8", ns='xmlns="http://www.landxml.org/schema/LandXML-1.2"', name="Main"):
    return MINIMAL.format(enc=enc, ns=ns, name=name).encode(enc)


def test_us_sample():
    doc = landxml.read(US_SAMPLE)
    assert doc.units.linear == "USSurveyFoot"
    assert [a.name for a in doc.alignments] == ["Orrin Vale Bypass", "Kettle Lane"]
    main = doc.alignment("Orrin Vale Bypass")
    prof = main.profile()
    assert [p.kind for p in prof.pvis] == [
        "none",
        "parabolic",
        "parabolic",
        "unsymmetric",
        "parabolic",
        "parabolic",
        "none",
    ]
    assert prof.pvis[3].length_in == 300.0 and prof.pvis[3].length_out == 500.0
    assert prof.pvis[1].source.line is not None
    assert main.grounds[0].name == "Existing ground"
    assert len(main.grounds[0].pieces[0].stations) == 105


def test_metric_sample_has_circular_curves_and_equation():
    doc = landxml.read(METRIC_SAMPLE)
    assert doc.units.metric
    al = doc.alignment()
    kinds = [p.kind for p in al.profile().pvis]
    assert kinds.count("circular") == 2
    assert al.equations[0].ahead == 1250.0


@pytest.mark.parametrize(
    "ns",
    [
        'xmlns="http://www.landxml.org/schema/LandXML-1.0"',
        'xmlns="http://www.landxml.org/schema/LandXML-1.1"',
        "",
        'xmlns:lx="urn:example" xmlns="http://www.example.org/national-extension"',
    ],
    ids=["1.0", "1.1", "none", "other"],
)
def test_namespace_agnostic(ns):
    doc = landxml.parse_bytes(doc_bytes(ns=ns))
    assert doc.alignment().profile().pvis[1].length == 400.0


def test_latin1_encoding_is_honoured():
    data = doc_bytes(enc="ISO-8859-1", name="Rue de l'Étang")
    assert "É".encode("latin-1") in data
    doc = landxml.parse_bytes(data)
    assert doc.alignments[0].name == "Rue de l'Étang"


def test_doctype_refused():
    data = b"""<?xml version="1.0"?>
<!DOCTYPE lolz [<!ENTITY lol "lol"><!ENTITY lol2 "&lol;&lol;&lol;&lol;">]>
<LandXML><Units><Metric linearUnit="meter"/></Units><Project name="&lol2;"/></LandXML>"""
    with pytest.raises(InputError, match="DOCTYPE declarations are not accepted"):
        landxml.parse_bytes(data, "bomb.xml")


def test_external_entity_not_read(tmp_path):
    secret = tmp_path / "secret.txt"
    secret.write_text("TOP-SECRET-CONTENT")
    data = f"""<?xml version="1.0"?>
<!DOCTYPE x [<!ENTITY s SYSTEM "file://{secret}">]>
<LandXML><Units><Metric linearUnit="meter"/></Units><Project name="&s;"/></LandXML>""".encode()
    with pytest.raises(InputError) as info:
        landxml.parse_bytes(data, "xxe.xml")
    assert "TOP-SECRET" not in str(info.value)


def test_truncated_names_line():
    data = doc_bytes()[:300]
    with pytest.raises(InputError, match=r"^t.xml:\d+: XML: not well-formed"):
        landxml.parse_bytes(data, "t.xml")


def test_not_landxml():
    with pytest.raises(InputError, match="root element is not LandXML"):
        landxml.parse_bytes(b"<html><body/></html>", "x.xml")


def test_empty_file():
    with pytest.raises(InputError, match="the file is empty"):
        landxml.parse_bytes(b"", "e.xml")


def test_missing_units():
    with pytest.raises(InputError, match="no Units element"):
        landxml.parse_bytes(b"<LandXML><Alignments/></LandXML>", "u.xml")


def test_non_numeric_value_names_line_and_element():
    data = doc_bytes().replace(b"<PVI>0 100</PVI>", b"<PVI>0 abc</PVI>")
    with pytest.raises(
        InputError, match=r"^n.xml:8: PVI: station/elevation value 'abc' is not a number"
    ):
        landxml.parse_bytes(data, "n.xml").alignment(None).profile(None)


@pytest.mark.parametrize("bad", [b"nan", b"inf", b"-Infinity"])
def test_non_finite_value(bad):
    data = doc_bytes().replace(b"<PVI>0 100</PVI>", b"<PVI>0 " + bad + b"</PVI>")
    with pytest.raises(InputError, match="finite"):
        landxml.parse_bytes(data, "n.xml").alignment(None).profile(None)


def test_decreasing_pvis_name_line():
    data = doc_bytes().replace(b"<PVI>1000 105</PVI>", b"<PVI>400 105</PVI>")
    with pytest.raises(
        InputError, match=r"^d.xml:10: PVI: PVI stations must increase: 400 after 500"
    ):
        landxml.parse_bytes(data, "d.xml").alignment(None).profile(None)


def test_negative_curve_length():
    data = doc_bytes().replace(b'length="400"', b'length="-400"')
    with pytest.raises(InputError, match=r":9: ParaCurve: curve length must be positive"):
        landxml.parse_bytes(data, "neg.xml").alignment(None).profile(None)


def test_missing_curve_length():
    data = doc_bytes().replace(b' length="400"', b"")
    with pytest.raises(InputError, match="ParaCurve: missing required attribute 'length'"):
        landxml.parse_bytes(data, "m.xml").alignment(None).profile(None)


def test_curve_on_first_pvi():
    data = doc_bytes().replace(b"<PVI>0 100</PVI>", b'<ParaCurve length="10">0 100</ParaCurve>')
    with pytest.raises(InputError, match=r":8: ParaCurve: the first entry of a profile"):
        landxml.parse_bytes(data, "f.xml").alignment(None).profile(None)


def test_duplicate_alignment_names():
    data = doc_bytes()
    start = data.index(b"<Alignment ")
    end = data.index(b"</Alignment>") + len(b"</Alignment>")
    data = data[:end] + data[start:end] + data[end:]
    doc = landxml.parse_bytes(data, "dup.xml")  # issue 14: the first reads, the second not
    assert [a.name for a in doc.alignments] == ["Main"]
    (bad,) = doc.broken
    assert bad.name.startswith("Main (line ")
    with pytest.raises(InputError, match=r"^dup.xml:\d+: Alignment: alignment name 'Main' is used"):
        doc.alignment(bad.name)


def test_unsupported_unit():
    data = doc_bytes().replace(b'linearUnit="foot"', b'linearUnit="chain"')
    with pytest.raises(InputError, match="linearUnit 'chain' is not supported"):
        landxml.parse_bytes(data, "c.xml")


def test_missing_file(tmp_path):
    with pytest.raises(InputError, match="cannot read the file"):
        landxml.read(tmp_path / "nope.xml")


def test_alignment_not_found():
    doc = landxml.parse_bytes(doc_bytes(), "a.xml")
    with pytest.raises(InputError, match="no alignment named 'X'; alignments: Main"):
        doc.alignment("X")


def test_no_alignments():
    doc = landxml.parse_bytes(b'<LandXML><Units><Metric linearUnit="meter"/></Units></LandXML>')
    with pytest.raises(InputError, match="the file has no alignments"):
        doc.alignment()
