"""The record's HTML sheet: escaped user text, no network reference, print rules."""

from __future__ import annotations

import re
from html.parser import HTMLParser

import pytest
import record_fake_study as fake

from kit.record import build_record

_URL_ATTRS = {"src", "href", "action", "formaction", "data", "poster", "srcset", "xlink:href",
              "background", "manifest", "ping", "cite", "longdesc", "codebase"}


class _Scan(HTMLParser):
    """Collects tags, URL-bearing attributes and script/style text (script content is CDATA)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.urls: list[tuple[str, str, str]] = []
        self.scripts: list[str] = []
        self.styles: list[str] = []
        self.text: list[str] = []
        self._in = None

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for k, v in attrs:
            if k in _URL_ATTRS and v is not None:
                self.urls.append((tag, k, v))
            if k.startswith("on"):
                self.urls.append((tag, k, v or ""))  # no event-handler attributes at all
        if tag in ("script", "style"):
            self._in = tag
            (self.scripts if tag == "script" else self.styles).append("")

    def handle_endtag(self, tag):
        if tag == self._in:
            self._in = None

    def handle_data(self, data):
        if self._in == "script":
            self.scripts[-1] += data
        elif self._in == "style":
            self.styles[-1] += data
        else:
            self.text.append(data)


def _scan(page: str) -> _Scan:
    s = _Scan()
    s.feed(page)
    s.close()
    return s


def _figures(n=2):
    go = pytest.importorskip("plotly.graph_objects")
    out = []
    for i in range(n):
        fig = go.Figure(go.Scatter(x=[0, 1, 2], y=[0, 1 + i, 4]))
        fig.update_layout(title_text=f"figure {i} </script><script>alert({i})</script>")
        out.append(fig)
    return out


@pytest.fixture(scope="module")
def page_plain():
    sc = fake.scenario()
    return build_record(sc, fake.compute(sc)).to_html()


@pytest.fixture(scope="module")
def page_figs():
    sc = fake.scenario()
    return build_record(sc, fake.compute(sc), figures=_figures()).to_html()


def test_user_markup_stays_text(page_plain):
    s = _scan(page_plain)
    assert len(s.scripts) == 1                     # only our own print-resize script
    assert "alert" not in s.scripts[0]
    assert "b" not in s.tags                       # "<b>bold</b>" in the project name is text
    text = "".join(s.text)
    assert "<script>alert(1)</script>" in text     # shown literally (title and input)
    assert "<script>alert(2)</script> a note" in text  # a note that looks like markup, as text
    assert "Marlow Creek test rig <b>bold</b>" in text
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page_plain


def test_no_network_reference(page_plain, page_figs):
    for page in (page_plain, page_figs):
        s = _scan(page)
        assert s.urls == [], s.urls
        assert "link" not in s.tags and "iframe" not in s.tags and "img" not in s.tags
        for css in s.styles:
            assert "url(" not in css and "@import" not in css
        # the CSP forbids any fetch: default-src 'none', connect-src 'none'
        assert "default-src &#x27;none&#x27;" in page
        # no http(s) URL anywhere outside the inlined plotly.js bundle
        outside = re.sub(r"<script>.*?</script>", "", page, flags=re.S)
        assert not re.search(r"https?://", outside)


def test_plotly_inlined_once(page_figs):
    s = _scan(page_figs)
    bundles = [t for t in s.scripts if "Plotly" in t and len(t) > 1_000_000]
    assert len(bundles) == 1
    assert page_figs.count('class="figure"') == 2
    # figure titles with markup are JSON-escaped by plotly, so no script breaks out
    assert "<script>alert(0)" not in page_figs and "<script>alert(1)</script>" not in page_figs


def test_print_rules(page_plain):
    css = _scan(page_plain).styles[0]
    assert "@page" in css and "margin: 15mm" in css
    assert "@media print" in css
    assert "break-inside: avoid" in css and "page-break-inside: avoid" in css
    assert "display: table-header-group" in css  # header rows repeat on each page
    # no fixed widths in absolute units beyond the page: only %, rem, or none
    assert not re.search(r"(?<!max-)width:\s*\d+(px|mm|cm|in)", css)
    assert "background: #fff" in css


def test_sections_and_severity_words(page_plain):
    text = "".join(_scan(page_plain).text)
    for heading in ("Findings", "Results", "Inputs (scenario as written)", "Methods and references",
                    "Cautions", "Stamp"):
        assert heading in text
    assert "✓ PASS" in text and "! CHECK" in text      # words, not colour only
    assert "Overall: ! CHECK — 1 pass, 1 check, 0 fail." in text
    assert "Checked by" in text and "Date checked" in text
    assert "HL-0042" in text and "54.0 m³/h" in text
    assert "Swamee, P.K., Jain, A.K. (1976)" in text
    assert "Local codes" in text                       # the general caution
