"""The report as a reader sees it: every demo's report.html in headless Chromium.

Chromium and its driver come from Debian's ``chromium`` and ``chromium-driver``
packages (``.ci/run`` installs them); selenium drives them and pypdf reads the
printed PDF. Without them the tests skip and say why. Budget: at most 60 s for
this module on 2 cores (the reports themselves come from the shared session
fixtures).

Checks, at a print-width viewport (794 px: A4's 210 mm at the CSS 96 px/in,
from the CSS Values spec and ISO 216) and at 1280 px (a common laptop width,
common practice), and in print media at A4's text width:

- no element reaches past the right or left edge of the page;
- every image has decoded (``naturalWidth > 0``);
- the browser's console logs no error;
- printing to PDF (Chrome DevTools ``Page.printToPDF``) gives one image per
  figure of the HTML and no page wider than A4 (595.28 pt, ISO 216).
"""

from __future__ import annotations

import base64
import io
import shutil
import tempfile
from pathlib import Path

import pytest

VIEWPORTS_PX = (794, 1280)
VIEWPORT_HEIGHT_PX = 1100
# A4 width 210 mm less the report's @page margins (14 mm each side) at 96 px/in
PRINT_TEXT_WIDTH_PX = round((210 - 2 * 14) / 25.4 * 96)
A4_WIDTH_PT = 210 / 25.4 * 72  # ISO 216: 210 mm; 72 pt/in (PDF user space)
PDF_TOLERANCE_PT = 0.5  # Chromium rounds the page box to whole device pixels
CHROMIUM_FLAGS = (
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
    "--disable-component-update", "--disable-sync", "--no-first-run",
    "--disable-dev-shm-usage",
)
# Elements whose box reaches outside [0, clientWidth] (half a pixel for rounding).
OVERFLOW_SCRIPT = """
const width = document.documentElement.clientWidth;
const out = [];
for (const e of document.body.querySelectorAll('*')) {
  const box = e.getBoundingClientRect();
  if (box.width > 0 && (box.right > width + 0.5 || box.left < -0.5)) {
    out.push(`${e.tagName.toLowerCase()}${e.id ? '#' + e.id : ''} `
             + `[${Math.round(box.left)}, ${Math.round(box.right)}]`);
  }
}
return {width: width, scroll: document.documentElement.scrollWidth, over: out};
"""
IMAGES_SCRIPT = """
return [...document.images].map(i => ({alt: i.alt.slice(0, 60), complete: i.complete,
                                       natural: i.naturalWidth}));
"""


def _chromium_paths() -> tuple[str, str] | None:
    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    driver = shutil.which("chromedriver")
    return (browser, driver) if browser and driver else None


@pytest.fixture(scope="module")
def browser():
    webdriver = pytest.importorskip("selenium.webdriver", reason="selenium is not installed "
                                    "(pip install -e '.[test]')")
    paths = _chromium_paths()
    if paths is None:
        pytest.skip("no Chromium here: install Debian's chromium and chromium-driver "
                    "(.ci/run does so where apt-get is available)")
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    options.binary_location = paths[0]
    with tempfile.TemporaryDirectory(prefix="tmd-chromium-") as profile:
        for flag in CHROMIUM_FLAGS + (f"--user-data-dir={profile}",):
            options.add_argument(flag)
        options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
        driver = webdriver.Chrome(service=Service(paths[1]), options=options)
        try:
            yield driver
        finally:
            driver.quit()


def _write(files: dict[str, bytes], folder: Path) -> Path:
    for name, data in files.items():
        path = folder / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)
    return folder / "report.html"


def _show(driver, html: Path, width_px: int, media: str = "screen") -> None:
    driver.execute_cdp_cmd("Emulation.setDeviceMetricsOverride", {
        "width": width_px, "height": VIEWPORT_HEIGHT_PX, "deviceScaleFactor": 1,
        "mobile": False})
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"media": media})
    driver.get(html.as_uri())


def check_in_browser(driver, files: dict[str, bytes], folder: Path) -> None:
    """Layout, images, console and PDF checks of one report (see the module docstring)."""
    html = _write(files, folder)
    figures = files["report.html"].count(b"<figure")
    assert figures > 0
    views = [(w, "screen") for w in VIEWPORTS_PX] + [(PRINT_TEXT_WIDTH_PX, "print")]
    for width, media in views:
        _show(driver, html, width, media)
        layout = driver.execute_script(OVERFLOW_SCRIPT)
        assert layout["over"] == [], (width, media, layout["over"][:8])
        assert layout["scroll"] <= layout["width"], (width, media, layout)
        images = driver.execute_script(IMAGES_SCRIPT)
        assert len(images) == figures
        undecoded = [i for i in images if not (i["complete"] and i["natural"] > 0)]
        assert undecoded == [], (width, undecoded)
    _show(driver, html, VIEWPORTS_PX[0], media="")  # no emulation: printing uses print
    errors = [e for e in driver.get_log("browser") if e.get("level") == "SEVERE"]
    assert errors == []

    from pypdf import PdfReader

    pdf = driver.execute_cdp_cmd("Page.printToPDF", {"preferCSSPageSize": True,
                                                     "printBackground": True})
    reader = PdfReader(io.BytesIO(base64.b64decode(pdf["data"])))
    widths = [float(page.mediabox.width) for page in reader.pages]
    assert widths and max(widths) <= A4_WIDTH_PT + PDF_TOLERANCE_PT, widths
    assert sum(len(page.images) for page in reader.pages) == figures


@pytest.fixture(scope="module")
def _pdf_reader():
    return pytest.importorskip("pypdf", reason="pypdf is not installed (pip install -e "
                               "'.[test]')")


def test_design_report_reads_right_in_a_browser(browser, _pdf_reader, case_report, tmp_path):
    check_in_browser(browser, case_report[2], tmp_path)


def test_compare_report_reads_right_in_a_browser(browser, _pdf_reader, compare_report,
                                                 tmp_path):
    check_in_browser(browser, compare_report[2], tmp_path)


def test_every_section_reads_right_in_a_browser(browser, _pdf_reader, full_report, tmp_path):
    check_in_browser(browser, full_report[2], tmp_path)


@pytest.fixture(scope="module")
def building_report_files():
    """report.html of the whole-building demo (Corvid Spire), as ``tmd design`` writes it."""
    from tmd.building_case import load_building_case
    from tmd.building_job import building_design_job
    from tmd.report.building import building_report

    case = Path(__file__).resolve().parents[2] / "cases" / "building" / "corvid_spire.toml"
    return building_report(building_design_job(load_building_case(case)), dpi=40)


def test_building_report_reads_right_in_a_browser(browser, _pdf_reader, building_report_files,
                                                  tmp_path):
    check_in_browser(browser, building_report_files, tmp_path)


def test_the_check_catches_a_table_wider_than_the_page(browser, _pdf_reader, tmp_path):
    """The overflow check itself can fail: a 3000 px table must be reported."""
    wide = ("<!DOCTYPE html><html><body><table id='wide'><tr><td style='white-space:nowrap'>"
            + "x" * 600 + "</td></tr></table></body></html>")
    html = _write({"report.html": wide.encode()}, tmp_path)
    _show(browser, html, VIEWPORTS_PX[0])
    assert any(o.startswith("table#wide") for o in browser.execute_script(OVERFLOW_SCRIPT)["over"])
