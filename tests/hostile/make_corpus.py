"""Write the hostile and broken input corpus (run from the project root).

    python tests/hostile/make_corpus.py

Every file here must end with exit 2 and one line naming file, line and element;
none may leak file content, hang or run out of memory.
"""

from __future__ import annotations

import random
from pathlib import Path

HERE = Path(__file__).resolve().parent
SAMPLE = HERE.parent.parent / "samples" / "orrin-vale-bypass.xml"
SECRET = "GRADELINE-SECRET-CANARY"

HEAD = '<?xml version="1.0" encoding="UTF-8"?>\n'
BODY = (
    '<LandXML><Units><Imperial linearUnit="foot"/></Units><Alignments>'
    '<Alignment name="A{x}"><Profile><ProfAlign><PVI>0 100</PVI><PVI>100 {y}</PVI>'
    "</ProfAlign></Profile></Alignment></Alignments></LandXML>\n"
)


def xxe_files(canary: Path) -> dict[str, bytes]:
    """External-entity attacks on ``canary`` (written by the tests with a real secret)."""
    return {
        "xxe-local-file.xml": (
            HEAD
            + f'<!DOCTYPE LandXML [<!ENTITY x SYSTEM "file://{canary}">]>\n'
            + BODY.format(x="&x;", y="101")
        ).encode(),
        "xxe-in-text.xml": (
            HEAD
            + f'<!DOCTYPE LandXML [<!ENTITY x SYSTEM "file://{canary}">]>\n'
            + BODY.format(x="", y="101").replace("<PVI>0 100</PVI>", "<PVI>&x;</PVI>")
        ).encode(),
        "xxe-parameter-entity.xml": (
            HEAD
            + f'<!DOCTYPE LandXML [<!ENTITY % p SYSTEM "file://{canary}"> %p;]>\n'
            + BODY.format(x="", y="101")
        ).encode(),
    }


def main() -> None:
    files: dict[str, bytes] = {}
    files["external-dtd.xml"] = (
        HEAD
        + '<!DOCTYPE LandXML SYSTEM "http://dtd.invalid/landxml.dtd">\n'
        + BODY.format(x="", y="101")
    ).encode()
    lol = "".join(f'<!ENTITY l{i} "{("&l" + str(i - 1) + ";") * 10}">' for i in range(1, 10))
    files["billion-laughs.xml"] = (
        HEAD + f'<!DOCTYPE LandXML [<!ENTITY l0 "lol">{lol}]>\n' + BODY.format(x="&l9;", y="1")
    ).encode()
    files["quadratic-blowup.xml"] = (
        HEAD
        + f'<!DOCTYPE LandXML [<!ENTITY a "{"x" * 50000}">]>\n'
        + BODY.format(x="&a;" * 20000, y="1")
    ).encode()
    files["deep-nesting.xml"] = (
        HEAD + "<LandXML>" + "<a>" * 100000 + "</a>" * 100000 + "</LandXML>\n"
    ).encode()
    files["empty.xml"] = b""
    rng = random.Random(7)
    files["binary-garbage.xml"] = bytes(rng.randrange(256) for _ in range(4096))
    files["wrong-encoding.xml"] = (
        '<?xml version="1.0" encoding="UTF-16"?>\n' + BODY.format(x="", y="101")
    ).encode("ascii")
    files["unknown-encoding.xml"] = (
        '<?xml version="1.0" encoding="no-such-charset"?>\n' + BODY.format(x="", y="101")
    ).encode("ascii")
    sample = SAMPLE.read_bytes()
    for k, frac in enumerate((0.07, 0.31, 0.52, 0.88)):
        files[f"truncated-{k + 1}.xml"] = sample[: int(len(sample) * frac)]
    for tag, value in (("nan", "NaN"), ("inf", "-inf"), ("huge", "1e300"), ("overflow", "1e999")):
        files[f"number-{tag}.xml"] = (HEAD + BODY.format(x="", y=value)).encode()
    files["missing-name.xml"] = (HEAD + BODY.format(x="", y="1").replace(' name="A"', "")).encode()
    files["missing-length.xml"] = (
        HEAD
        + BODY.format(x="", y="1").replace(
            "<PVI>100 1</PVI>", "<ParaCurve>50 3</ParaCurve><PVI>100 1</PVI>"
        )
    ).encode()
    files["missing-units.xml"] = (
        HEAD + BODY.format(x="", y="1").replace('<Units><Imperial linearUnit="foot"/></Units>', "")
    ).encode()
    files["duplicate-alignments.xml"] = (
        HEAD
        + BODY.format(x="", y="1").replace(
            "</Alignments>",
            '<Alignment name="A"><Profile><ProfAlign><PVI>0 1</PVI><PVI>9 2</PVI>'
            "</ProfAlign></Profile></Alignment></Alignments>",
        )
    ).encode()
    files["not-landxml.xml"] = b'<?xml version="1.0"?>\n<svg><g/></svg>\n'
    for name, data in files.items():
        (HERE / name).write_bytes(data)
    print(f"wrote {len(files)} files to {HERE}")


if __name__ == "__main__":
    main()
