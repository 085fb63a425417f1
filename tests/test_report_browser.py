"""The HTML report in a real browser: Debian's Chromium, headless, driven by Playwright.

The page is opened from a file:// URL with every request that is not a file aborted and recorded;
the test asserts that none was made (for a hand-made document, one built from the API, and the real
output of ``meshhydro report`` on a demo case), that the browser logged no console error and no page error
(a Content-Security-Policy violation would be one), that the figures render, and that the page
screenshots at desktop width and prints to PDF on A4 and on letter paper.

The browser is the system's /usr/bin/chromium (Debian package ``chromium``); Playwright never
downloads one here. Without it the test is skipped on a developer's machine, and fails when the
environment variable CI is set (CI installs it in .ci/run).
"""
from __future__ import annotations

import os

import pytest

from meshhydro import figures
from meshhydro.html import render_html

import report_docs as R

CHROMIUM = "/usr/bin/chromium"
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
        "--disable-background-networking", "--disable-component-update", "--disable-sync"]


def _need(what: str, ok: bool) -> None:
    if ok:
        return
    if os.environ.get("CI"):
        pytest.fail(f"{what} is missing and CI is set: the browser test must run in CI")
    pytest.skip(f"{what} is missing (apt-get install chromium; pip install playwright)")


@pytest.fixture(scope="module")
def browser(tmp_path_factory):
    _need(CHROMIUM, os.path.exists(CHROMIUM))
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        _need("the Python package playwright", False)
    profile = tmp_path_factory.mktemp("chromium-profile")  # a fresh user-data-dir
    with sync_playwright() as p:
        ctx = p.chromium.launch_persistent_context(
            str(profile), executable_path=CHROMIUM, headless=True, args=ARGS,
            viewport={"width": 1280, "height": 900}, service_workers="block", offline=True)
        try:
            yield ctx
        finally:
            ctx.close()


def _cli_report(tmp_path, tanks: bool = False) -> tuple[str, int]:
    """The real ``meshhydro report`` of a demo case (sweep frames and animation included), and its figure count;
    ``tanks``: the tank case with its damage condition and KG limits instead (no sweep)."""
    from meshhydro.cli import main

    out = tmp_path / "review.html"
    if tanks:
        argv = ["report", os.path.join(R.ROOT, "meshes", "cases", "brindle_tanks.toml"), "--out", str(out),
                "--heels", "0:90:5", "--no-sweep", "--kg-limits", "30:60:15", "--quiet"]
    else:
        argv = ["report", os.path.join(R.ROOT, "meshes", "cases", "tern_sloop.toml"), "--out", str(out),
                "--heels", "0:90:2", "--sweep-heels", "0:30:15", "--size", "480x360", "--sections", "6", "--quiet"]
    code = main(argv)
    assert code in (0, 1) and out.exists()
    text = out.read_text(encoding="utf-8")
    return text, text.count("<figure ")


@pytest.mark.parametrize("which", ["hand", "real", "cli", "cli-tanks"])
def test_report_in_chromium(browser, tmp_path, which):
    if which.startswith("cli"):
        text, n_fig = _cli_report(tmp_path, tanks=which == "cli-tanks")
    else:
        doc = R.hand_document() if which == "hand" else R.real_document()
        text = render_html(doc, draw=R.draw_hand if which == "hand" else figures.draw)
        n_fig = sum(len(s.figures) for s in R.all_sections(doc))
    page_file = tmp_path / "report.html"
    page_file.write_text(text, encoding="utf-8")
    url = page_file.as_uri()

    requested, refused, problems = [], [], []

    def route(r):
        if r.request.url.startswith("file://"):
            r.continue_()
        else:
            refused.append(r.request.url)
            r.abort()

    page = browser.new_page()
    page.route("**/*", route)
    page.on("request", lambda req: requested.append(req.url))
    page.on("console", lambda m: problems.append(f"console {m.type}: {m.text}") if m.type in ("error", "warning")
            else None)
    page.on("pageerror", lambda e: problems.append(f"page error: {e}"))
    page.goto(url, wait_until="load")
    page.wait_for_timeout(200)

    assert refused == []  # nothing beyond the file itself was asked for (data: URIs make no request)
    assert [u for u in requested if u != url] == []
    assert problems == []

    # the document as the browser built it: every contents link resolves, figures have a size
    info = page.evaluate("""() => ({
        links: [...document.querySelectorAll('nav a')].map(a => !!document.getElementById(a.hash.slice(1))),
        svgs: [...document.querySelectorAll('figure svg')].map(s => s.getBoundingClientRect().width),
        imgs: [...document.querySelectorAll('img')].map(i => i.complete && i.naturalWidth > 0),
        caution: document.querySelector('.mh-caution').innerText,
        verdict: document.querySelector('.mh-verdict').innerText })""")
    assert info["links"] and all(info["links"])
    assert len(info["svgs"]) + len(info["imgs"]) == n_fig
    assert all(w > 300 for w in info["svgs"]) and all(info["imgs"])
    assert "CAUTION" in info["caution"] and info["verdict"].startswith("Verdict")

    shot = tmp_path / "desktop.png"
    page.screenshot(path=str(shot), full_page=True)
    with open(shot, "rb") as fh:
        assert fh.read(8) == b"\x89PNG\r\n\x1a\n"
    assert shot.stat().st_size > 10_000

    # print: major sections start a page, and nothing is wider than an A4 page's text width
    page.emulate_media(media="print")
    page.set_viewport_size({"width": 680, "height": 1000})
    breaks = page.evaluate("""() => [...document.querySelectorAll('main > section.mh-major')]
        .map(s => getComputedStyle(s).breakBefore)""")
    assert breaks[0] != "page" and breaks[1:] and all(b == "page" for b in breaks[1:])
    assert page.evaluate("() => document.documentElement.scrollWidth") <= 680
    for fmt in ("A4", "Letter"):
        pdf = tmp_path / f"report-{fmt}.pdf"
        page.pdf(path=str(pdf), format=fmt, print_background=True)
        data = pdf.read_bytes()
        assert data.startswith(b"%PDF") and len(data) > 5_000
    page.close()
    assert refused == [] and problems == []
