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


# ------------------------------------------------------------------ findings in display units
#: A number followed by an SI unit as the core writes it (outside quoted names).
_SI_TEXT = re.compile(r"(?<![\w.])[-+−]?\d[\d.]*(?:e[-+]?\d+)?\s?"
                      r"(?:Pa|kPa|MPa|m³/s|m3/s|m/s|m³/h|kW|W|mm|m|°C|K)(?![\w/²³·])")


def _unquoted(text: str) -> str:
    """Text without the names the user typed in single quotes (kept as typed) and without
    the sources (citations, quoted as written: ``<i>`` in the references, ``hl-source``
    cells in the panel)."""
    import html as _html

    text = re.sub(r'<i>.*?</i>|<td class="hl-source">.*?</td>', " ", text, flags=re.S)
    return re.sub(r"(?<!\w)'[^']*'(?!\w)", "''",
                  _html.unescape(re.sub(r"<[^>]+>", " ", text)))


@pytest.mark.parametrize("name", ["tallow_creek_rising_main", "kestrel_ridge_booster",
                                  "marlow_vale_cip_dump", "brackenmoor_siphon_dump",
                                  "harlow_flats_diesel_transfer"])
def test_us_findings_carry_no_si_text(name):
    """A scenario shown in US units: the findings of the record, the text summary and the
    findings panel show every value, limit, subject and rule in US units, each pressure
    gauge or absolute (issue 12)."""
    from pathlib import Path

    from kit import scenario
    from kit.panels.findings_view import findings_html
    from kit.results import compute
    from kit.textout import grouped_findings_text, summary

    sc = scenario.load(Path(__file__).resolve().parents[2] / "scenarios" / f"{name}.toml")
    sc.set("display.system", "US")
    res = compute(sc)
    assert res.findings
    page = build_record(sc, res).to_html()
    part = page[page.index('id="findings"'):page.index('id="results"')]
    refs = re.search(r'<ol class="refs">.*?</ol>', page, re.S)
    refs = refs.group(0) if refs else ""
    for where, text in (("record findings", part), ("record references", refs),
                        ("panel", findings_html(res.findings, "US")),
                        ("summary", "\n".join(grouped_findings_text(res, "US")))):
        left = _SI_TEXT.findall(_unquoted(text))
        assert not left, (where, sorted(set(left))[:10])
    # every pressure value of the findings says gauge or absolute (or is a difference)
    full = summary(sc, res, "US", full=True)
    assert " Pa" not in _unquoted(full.split("Findings", 1)[1].split("Methods", 1)[0])


def test_limits_in_display_units():
    """Limits are written from their words' numbers in the display system with sensible
    digits; a pressure says gauge or absolute. Conversions: 1 US gpm = 3.785411784 L/min,
    1 psi = 6894.757 Pa, 1 hp = 745.7 W (NIST SP 811)."""
    from kit.core.findings import Finding, Severity
    from kit.textout import display_words, finding_value, limit_text

    def f(quantity, value, unit, limit, **kw):
        return Finding(Severity.PASS, "pump 'P 150 mm' at 10 °C", quantity, value, unit,
                       limit, "rule", "common practice, no source", **kw)

    flow = f("flow, lowest over band", 0.03, "m³/s", ">= 0.025 m³/s")
    assert limit_text(flow, "US") == ">= 396 gpm"        # 0.025 m³/s = 396.3 gpm
    assert limit_text(flow, "SI") == ">= 90 m³/h"
    rating = f("pipe pressure (gauge)", 5e5, "Pa", "<= 1.96e+06 Pa gauge (class rating)",
               high=1.96e6)
    assert limit_text(rating, "US") == "<= 284 psig (class rating)"   # 1.96 MPa = 284.3 psi
    assert limit_text(rating, "SI") == "<= 1960 kPa(g) (class rating)"
    assert finding_value(rating, "US") == "= 72.5 psig"
    vap = f("lowest pressure (absolute)", 5e4, "Pa", "> 2985.8 Pa (vapour pressure)")
    assert limit_text(vap, "US") == "> 0.433 psia (vapour pressure)"
    assert finding_value(vap, "SI") == "= 50.0 kPa(a)"
    crest = f("gauge pressure", -9.2e4, "Pa", ">= 0 Pa(g)")
    assert (limit_text(crest, "US"), finding_value(crest, "US")) == (">= 0 psig", "= -13.3 psig")
    vent = f("vent pressure drop", 36.0, "Pa", "<= 250 Pa vacuum (gauge, below atmospheric)")
    assert limit_text(vent, "US").startswith("<= 0.0363 psi vacuum")
    assert finding_value(vent, "US") == "= 0.00522 psi"            # a drop: no tag
    motor = f("shaft power", 1e4, "W", "<= 11.1855 kW motor rating")
    assert limit_text(motor, "US") == "<= 15 hp motor rating"      # 15 hp = 11.19 kW
    assert limit_text(motor, "SI") == "<= 11.1855 kW motor rating"  # SI words kept
    band = f("velocity", 2.0, "m/s", "1–3 m/s", low=1.0, high=3.0)
    assert limit_text(band, "US") == "3.28–9.84 ft/s"
    assert limit_text(f("NPSH margin", 2.0, "m", ">= 1 m"), "SI") == ">= 1 m"
    # words without a quantity stay; bounds without words are written from the numbers
    assert limit_text(f("x", 1.0, "-", "POR 0.7–1.2, AOR 0.5–1.3"), "US") == \
        "POR 0.7–1.2, AOR 0.5–1.3"
    assert limit_text(f("velocity", 2.0, "m/s", "criteria band", low=1.0), "US") == \
        ">= 3.28 ft/s"
    # names in quotes are the user's, kept as typed; section numbers are not quantities
    assert display_words("pump 'P 150 mm' at 10 °C", "US") == "pump 'P 150 mm' at 50 °F"
    assert display_words("ASME B31.3 §304.1.2 straight pipe; c = 1.5 mm", "US") == \
        "ASME B31.3 §304.1.2 straight pipe; c = 0.0591 in"
    assert display_words("93.31 kPa(abs) = -6.995 kPa(g)", "US") == "13.5 psia = -1.01 psig"
