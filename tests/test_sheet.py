"""The PDF sheet, read back with an independent PDF library (pypdf) and, where present, poppler's pdftotext."""

from __future__ import annotations

import io
import re
import shutil
import subprocess
import unicodedata
from pathlib import Path

import pytest
from pypdf import PdfReader

from machines.errors import InputError
from reports.notices import SAFETY_NOTICE
from reports import tables
from reports.fonts import register
from reports.sheet import build_sheet

try:
    from tests.test_sheet_records import FINGERPRINT, motor_record
except ImportError:  # tests/ on sys.path instead of the project root
    from test_sheet_records import FINGERPRINT, motor_record

# ISO 216 A4 is 210 mm × 297 mm = 595.28 pt × 841.89 pt; ANSI letter 8.5 in × 11 in = 612 pt × 792 pt
A4_PT = (595.28, 841.89)
LETTER_PT = (612.0, 792.0)


def norm(text: str) -> str:
    """NFKC and one space for any run of white space (pypdf returns table cells one per line)."""
    return re.sub(r"\s+", " ", unicodedata.normalize("NFKC", text)).strip()


def pages_text(pdf: bytes) -> list[str]:
    return [norm(p.extract_text() or "") for p in PdfReader(io.BytesIO(pdf)).pages]


@pytest.fixture(scope="module")
def sheet() -> bytes:
    return build_sheet(motor_record())


@pytest.fixture(scope="module")
def text(sheet) -> str:
    return " ".join(pages_text(sheet))


def test_text_has_tag_ids_values_notice_and_fingerprint(sheet, text):
    record = motor_record()
    assert "CH-M-101" in text
    for f in record.functions:
        assert f.id in text
        assert norm(f.title) in text
    printed = [v for b in tables.settings_blocks(record) for r in b.rows for v in (r.primary, r.relay_side) if v]
    assert len(printed) > 10
    for value in printed:
        assert norm(value) in text, value
    assert norm(SAFETY_NOTICE) in text
    assert FINGERPRINT in text
    for row in tables.finding_rows(record):
        assert norm(row.message) in text


def test_every_page_has_footer_with_fingerprint_and_page_numbers(sheet):
    pages = pages_text(sheet)
    assert len(pages) >= 4
    for i, page in enumerate(pages, start=1):
        assert FINGERPRINT in page
        assert f"page {i} of {len(pages)}" in page
        assert "CH-M-101 · revision 2 · DRAFT" in page


def test_order_of_sections(text):
    marks = ["PROTECTION SETTINGS SHEET", "Machine and system data, as entered", "Settings", "Findings",
             "Safety notice", "Keying list", "Drawings", "Commissioning tests", "Revision history", "Sign-off"]
    positions = [text.index(m) for m in marks]
    assert positions == sorted(positions)


def test_drawings_and_test_table_present(text):
    for title in ("Motor starting and thermal limits", "Loss-of-field zones",
                  "Underfrequency stages against the turbine bands", "Negative-sequence current against"):
        assert title in text
    for row in tables.commissioning_rows(motor_record()):
        assert row.number in text
        assert norm(row.band) in text
    for name in ("A. Okafor", "L. Brandt", "M. Sato"):
        assert name in text


@pytest.mark.parametrize("size, expected", [("A4", A4_PT), ("letter", LETTER_PT), ("LETTER", LETTER_PT)])
def test_page_size(size, expected):
    pdf = build_sheet(motor_record(), size)
    reader = PdfReader(io.BytesIO(pdf))
    for page in reader.pages:
        assert float(page.mediabox.width) == pytest.approx(expected[0], abs=0.01)
        assert float(page.mediabox.height) == pytest.approx(expected[1], abs=0.01)


def test_page_size_from_the_machine_file_and_page_count():
    reader = PdfReader(io.BytesIO(build_sheet(motor_record(page_size="letter"))))
    assert float(reader.pages[0].mediabox.width) == pytest.approx(LETTER_PT[0])
    # regression pin of this fixture's layout: data and settings, keying list, the time-current and the R-X drawings
    # a page each, the other two drawings on one page, the tests
    assert len(reader.pages) == 8


def test_bad_page_size():
    with pytest.raises(InputError, match="expected A4 or letter, got 'A3'"):
        build_sheet(motor_record(), "A3")


def test_deterministic(sheet):
    assert build_sheet(motor_record()) == sheet


def test_metadata_carries_fingerprint_and_tag(sheet):
    meta = PdfReader(io.BytesIO(sheet)).metadata
    assert f"inputs_fingerprint={FINGERPRINT}" in meta["/Keywords"]
    assert meta["/Keywords"].endswith("tag=CH-M-101")
    assert "CH-M-101" in meta["/Title"]


@pytest.mark.parametrize("tag", ["M-101 <spare> & co", "P-7 <font size=40>big</font>", "A&amp;B <b>x</b>"])
def test_markup_in_tags_prints_as_written(tag):
    pdf = build_sheet(motor_record(tag=tag, description=f"desc {tag} <br/> end"))
    pages = pages_text(pdf)
    assert tag in pages[0]
    assert f"desc {tag} <br/> end" in pages[0]
    assert all(tag in p for p in pages)  # the footer carries the tag too
    assert PdfReader(io.BytesIO(pdf)).metadata["/Keywords"].endswith(f"tag={tag}")


def test_unicode_tag_latin():
    tag = "Pumpe-Ü-Ω-µ-3½"
    text = " ".join(pages_text(build_sheet(motor_record(tag=tag))))
    assert norm(tag) in text


def test_unicode_tag_beyond_latin():
    if not register():
        pytest.skip("DejaVu Sans is not installed; characters outside Latin-1 have no font to print in")
    tag = "Насос-3 Αντλία"
    pages = pages_text(build_sheet(motor_record(tag=tag)))
    assert tag in pages[0]
    assert tag in pages[-1]


def test_long_description_wraps_inside_the_page(tmp_path):
    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext (poppler-utils) is not installed")
    description = " ".join(["centrifugal"] * 60) + " " + "X" * 300
    pdf = build_sheet(motor_record(description=description))
    path = tmp_path / "long.pdf"
    path.write_bytes(pdf)
    out = subprocess.run(["pdftotext", "-bbox", "-f", "1", "-l", "1", str(path), "-"], capture_output=True,
                         text=True, check=True).stdout
    page_w = float(re.search(r'<page width="([\d.]+)"', out).group(1))
    xmax = [float(x) for x in re.findall(r'xMax="([\d.]+)"', out)]
    assert xmax and max(xmax) <= page_w - 30  # nothing runs into the right margin
    text = pages_text(pdf)[0]
    assert text.count("centrifugal") >= 60
    assert text.replace(" ", "").count("X" * 300) == 1  # the unbroken word is split over lines, not lost


def test_record_without_functions_or_drawings():
    record = motor_record()
    record.functions, record.drawings, record.checks, record.derived = [], [], [], {}
    text = " ".join(pages_text(build_sheet(record)))
    assert "The study produced no settings for this machine." in text
    assert "The study produced no drawings for this machine." in text
    assert "The study reported no findings." in text
    assert norm(SAFETY_NOTICE) in text


# ---------------------------------------------------------------------------------------------------- drawings

def _drawing(kind="time-current", log=True, points=((1.0, 1.0), (10.0, 10.0)), **kw):
    from machines.record import Drawing, Series

    return Drawing(kind=kind, title="t", x_label="x", y_label="y", log_x=log, log_y=log,
                   series=[Series("s", list(points), kw.pop("style", "line"))], **kw)


@pytest.mark.parametrize("drawing", [
    _drawing(points=[(0.0, 1.0), (-1.0, 5.0), (2.0, 3.0), (50.0, 0.2)]),  # zero and negative on log axes: left out
    _drawing(points=[(float("nan"), 1.0), (2.0, float("inf")), (3.0, 4.0), (30.0, 0.4)]),  # non-finite: left out
    _drawing(points=[]),  # nothing to draw: an empty frame
    _drawing(points=[(5.0, 5.0)], style="points"),  # one point
    _drawing(points=[(1.0, 2.0), (100.0, 2.0)], x_range=(0.0, 10.0)),  # a log range from zero: taken from the data
    _drawing(log=False, points=[(3.0, 3.0), (3.0, 3.0)]),  # no extent on linear axes
    _drawing(points=[(1e-3, 1e5), (1e5, 1e-3)], x_range=(1.0, 100.0), y_range=(1.0, 100.0)),  # clipped both ends
    _drawing(kind="r-x", log=False, points=[(-5.0, -5.0), (5.0, 8.0)]),  # R-X without circles
    _drawing(points=[(float(k + 1), float(k + 1)) for k in range(500)], style="step"),
], ids=["non-positive", "non-finite", "empty", "one-point", "log-range-from-zero", "flat", "clipped", "rx-lines",
        "long-step"])
def test_odd_drawings_still_render(drawing):
    from reports.plots import figure

    g = figure(drawing, 500, 300)
    assert g["w"] == 500 and g["ops"]
    record = motor_record()
    record.drawings = [drawing]
    assert build_sheet(record)[:5] == b"%PDF-"


def test_many_series_get_distinct_pens():
    from reports.plots import pens

    styles = ["line", "dashed", "dotted", "points", "step"] * 3
    drawn = [(p.color, p.dash and tuple(p.dash), p.marker, p.line) for p in pens(styles)]
    assert len(set(drawn)) == len(drawn)


def test_clipping_keeps_the_inside_part():
    from reports.plots import Axes, clip_polyline

    # a line y = x from 0.01 to 1000 on a log box 1..100: the part from (1, 1) to (100, 100) remains
    (piece,) = clip_polyline([(0.01, 0.01), (1000.0, 1000.0)], Axes(1.0, 100.0, 1.0, 100.0, True, True))
    assert piece[0] == pytest.approx((1.0, 1.0)) and piece[-1] == pytest.approx((100.0, 100.0))
    # leaving and re-entering the box gives two pieces
    pieces = clip_polyline([(0.5, 0.5), (2.0, 0.5), (0.5, 0.8)], Axes(0.0, 1.0, 0.0, 1.0, False, False))
    assert len(pieces) == 2


# ---------------------------------------------------------------------------------------------------- examples

EXAMPLES = sorted((Path(__file__).resolve().parent.parent / "examples").glob("*.toml"))


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_sheets(path):
    from machines.files import load_case
    from machines.study import run_study

    case, warnings = load_case(path)
    record = run_study(case, warnings)
    pdf = build_sheet(record)
    pages = pages_text(pdf)
    text = " ".join(pages)
    assert record.tag in text
    for block in tables.settings_blocks(record):
        assert block.fid in text
        for r in block.rows:
            for value in (r.primary, r.relay_side):
                if value:
                    assert norm(value) in text, (block.fid, r.setting, value)
    assert norm(SAFETY_NOTICE) in text
    for i, page in enumerate(pages, start=1):
        assert record.inputs_fingerprint in page
        assert f"page {i} of {len(pages)}" in page
    size = PdfReader(io.BytesIO(pdf)).pages[0].mediabox
    expected = LETTER_PT if case.sheet.page_size == "letter" else A4_PT
    assert (float(size.width), float(size.height)) == pytest.approx(expected, abs=0.01)


def test_make_sheet_writes_a_safe_name_beside_the_file(tmp_path, capsys):
    from wizard.sheet_command import make_sheet

    text = EXAMPLES[0].read_text("utf-8")
    tag = next(line for line in text.splitlines() if line.startswith("tag = "))
    machine = tmp_path / "m.toml"
    machine.write_text(text.replace(tag, 'tag = "../up/M-1 <x>"'), "utf-8")
    assert make_sheet(machine) in (0, 1)
    written = [p.name for p in tmp_path.glob("*.pdf")]
    assert len(written) == 1 and "/" not in written[0] and ".." not in written[0]
    assert written[0].startswith("up_M-1_x-rev")
    assert capsys.readouterr().out.strip() == str(tmp_path / written[0])
    out_dir = tmp_path / "out"
    out_dir.mkdir()
    make_sheet(machine, output=out_dir, page_size="letter")
    assert [p.name for p in out_dir.glob("*.pdf")] == written


def test_make_sheet_bad_page_size_names_the_option(tmp_path):
    from wizard.sheet_command import make_sheet

    with pytest.raises(InputError, match="--page-size: expected A4 or letter, got 'A5'"):
        make_sheet(EXAMPLES[0], page_size="A5")


def test_unprintable_characters_are_reported():
    from reports.fonts import missing_glyphs

    # U+4E2D (CJK) is in neither Vera nor DejaVu Sans
    assert missing_glyphs("P-中-1 Ω") == ["中"]
    assert missing_glyphs("M-101 <spare> & co") == []


def test_same_bytes_in_another_process():
    # batch builds sheets in spawned processes: string hashing differs per process and must not change the bytes
    import hashlib
    import os
    import sys

    code = ("import hashlib, sys; sys.path.insert(0, 'tests'); from test_sheet_records import motor_record; "
            "from reports.sheet import build_sheet; "
            "print(hashlib.sha256(build_sheet(motor_record(tag='Насос-3 Ü'))).hexdigest())")
    root = Path(__file__).resolve().parent.parent
    digests = {subprocess.run([sys.executable, "-c", code], cwd=root, capture_output=True, text=True, check=True,
                              env={**os.environ, "PYTHONHASHSEED": seed}).stdout.strip() for seed in ("1", "2")}
    assert digests == {hashlib.sha256(build_sheet(motor_record(tag="Насос-3 Ü"))).hexdigest()}


def test_every_font_is_embedded(sheet):
    # a filed sheet must print the same everywhere: no font may be left to the viewer's substitutes
    fonts = {}
    for page in PdfReader(io.BytesIO(sheet)).pages:
        for name, ref in page["/Resources"]["/Font"].items():
            font = ref.get_object()
            fonts[str(font["/BaseFont"])] = font
    assert fonts
    for base, font in fonts.items():
        descriptor = font["/FontDescriptor"].get_object()
        assert any(k in descriptor for k in ("/FontFile", "/FontFile2", "/FontFile3")), base
