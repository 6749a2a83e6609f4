"""The build's report page: valid HTML (checked with the standard library's html.parser and
a strict tag-balance check), self-contained (every image a data: URI, nothing fetched from
outside), with the budget rows, the scenario echoed, the warnings and the caution."""

from __future__ import annotations

import base64
import html
from html.parser import HTMLParser
from pathlib import Path

import pytest
from budget_scenarios import PASSING_BUDGET, SMALL_CHANNEL, pieces, scenario_text, write
from reported import build_parts

from losslane.api import build
from losslane.report.text import CAUTION

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source"}
# a stripline with thick copper: Wheeler's thickness correction is stated for
# thickness/spacing <= 0.25, so this line raises a validity-range warning
THICK = """
[lines.thick]
kind = "stripline"
width = "6 mil"
thickness = "4 mil"
below = "4 mil"
above = "4 mil"
dielectric = "core"
"""


class StrictPage(HTMLParser):
    """Collects tags, attributes and text; fails on a misnested or unclosed element."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.tags: list[str] = []
        self.attrs: list[tuple[str, str, str | None]] = []
        self.text: list[str] = []
        self.in_pre = False
        self.pre = ""
        self.cells: list[str] = []
        self._cell: list[str] | None = None
        self.items: list[str] = []
        self._item: list[str] | None = None
        self.doctype = None
        self.errors: list[str] = []

    def handle_decl(self, decl: str) -> None:
        self.doctype = decl

    def handle_starttag(self, tag, attrs) -> None:
        self.tags.append(tag)
        self.attrs += [(tag, k, v) for k, v in attrs]
        if tag not in VOID:
            self.stack.append(tag)
        if tag == "pre":
            self.in_pre = True
        if tag in ("td", "th"):
            self._cell = []
        if tag == "li":
            self._item = []

    def handle_endtag(self, tag) -> None:
        if tag in VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> closes {self.stack[-1:] or 'nothing'}")
            return
        self.stack.pop()
        if tag == "pre":
            self.in_pre = False
        if tag in ("td", "th") and self._cell is not None:
            self.cells.append("".join(self._cell))
            self._cell = None
        if tag == "li" and self._item is not None:
            self.items.append("".join(self._item))
            self._item = None

    def handle_data(self, data) -> None:
        self.text.append(data)
        if self.in_pre:
            self.pre += data
        if self._cell is not None:
            self._cell.append(data)
        if self._item is not None:
            self._item.append(data)


def parse_page(text: str) -> StrictPage:
    p = StrictPage()
    p.feed(text)
    p.close()
    assert not p.errors, p.errors
    assert p.stack == [], f"unclosed: {p.stack}"
    assert p.doctype is not None and p.doctype.lower() == "doctype html"
    return p


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("report")
    channel = SMALL_CHANNEL + pieces("thick", ["0.3 in"], "thick-copper run")
    text = scenario_text(channel, PASSING_BUDGET, extra=THICK, name="report <lane> & co")
    scen = write(tmp, text)
    result, files, _, data = build_parts(build(scen, out=tmp / "out"))
    page = next(p for p in files if p.name.endswith("-report.html"))
    return result, files, data, page.read_text(encoding="utf-8"), text


def test_page_is_valid_html(built) -> None:
    *_, page, _ = built
    p = parse_page(page)
    assert p.tags[0] == "html" and "head" in p.tags and "body" in p.tags
    assert ("meta", "charset", "utf-8") in p.attrs


def test_page_is_self_contained(built) -> None:
    _, files, _, page, _ = built
    p = parse_page(page)
    imgs = [v for t, k, v in p.attrs if t == "img" and k == "src"]
    pngs = [f for f in files if f.suffix == ".png"]
    # IL, RL, a 2-port's phase/delay, VSWR and Smith charts, budget chart, ILD, impedance
    # profile, pulse response: each one embedded
    assert len(imgs) == len(pngs) == 9
    assert sorted(f.name[len("report-lane-co-") :] for f in pngs) == [
        "budget.png",
        "ild.png",
        "impedance-profile.png",
        "insertion-loss.png",
        "phase-delay.png",
        "pulse.png",
        "return-loss.png",
        "smith.png",
        "vswr.png",
    ]
    embedded = set()
    for src in imgs:
        assert src.startswith("data:image/png;base64,")
        raw = base64.b64decode(src.split(",", 1)[1], validate=True)
        assert raw[:8] == b"\x89PNG\r\n\x1a\n"  # the PNG signature
        embedded.add(raw)
    assert embedded == {f.read_bytes() for f in pngs}
    # nothing that a mail client or an offline browser would have to fetch
    assert "script" not in p.tags and "link" not in p.tags and "iframe" not in p.tags
    for tag, key, value in p.attrs:
        if key in ("src", "href", "srcset", "action", "data"):
            assert value is not None and value.startswith("data:"), (tag, key, value)
    low = page.lower()
    assert "http://" not in low and "https://" not in low
    assert "@import" not in low and "url(" not in low and "@font-face" not in low


def test_page_lists_the_budget_rows(built) -> None:
    result, _, data, page, _ = built
    p = parse_page(page)
    cells = set(p.cells)
    for seg in data["budget"]["segments"]:
        assert seg["name"] in cells
        assert f"{seg['loss_db']:.2f}" in cells
    assert {"reflections and interaction", "total", "Nyquist", "check 1"} <= cells
    b = data["budget"]
    assert f"{b['total_db']:.2f}" in cells and f"{b['margin_db']:+.2f}" in cells
    assert f"{b['reflections_db']:.2f}" in cells
    assert "All checks pass." in "".join(p.text)


def test_page_echoes_the_scenario_and_escapes_it(built) -> None:
    *_, page, text = built
    p = parse_page(page)
    assert p.pre == text  # the scenario file, verbatim
    assert "report <lane> & co" in "".join(p.text)
    assert "<lane>" not in page  # escaped in the markup, not injected


def test_page_lists_the_warnings_and_the_caution(built) -> None:
    result, _, data, page, _ = built
    p = parse_page(page)
    assert result.warnings, "the thick stripline should have raised a warning"
    assert any("thickness/spacing" in w for w in result.warnings)
    assert data["warnings"] == result.warnings
    for w in result.warnings:
        assert w in p.items
    assert CAUTION in "".join(p.text)


def test_page_without_plots_says_so(tmp_path: Path) -> None:
    scen = write(tmp_path, scenario_text(SMALL_CHANNEL, PASSING_BUDGET))
    _, files, _, _ = build_parts(build(scen, out=tmp_path / "o", plots=False))
    page = next(f for f in files if f.name.endswith("-report.html")).read_text()
    p = parse_page(page)
    assert "img" not in p.tags
    assert "--no-plots" in html.unescape(page)
    assert not [f for f in files if f.suffix == ".png"]
