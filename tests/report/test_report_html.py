"""The self-contained HTML report and the main figure of a run folder."""

from __future__ import annotations

import base64
import re
from html import escape
from pathlib import Path

import pytest

from valband.defaults import DEFAULT_PARAMETER_SET
from valband.errors import InputError
from valband.report.figure import main_figure
from valband.report.html import CAUTIONS, build_report


def test_demo_writes_report_and_figures(demo_run):
    out, summary = demo_run
    html = (out / "report.html").read_text(encoding="utf-8")
    assert html.startswith("<!DOCTYPE html>")
    # self-contained: no external resources of any kind (no http(s) URLs, no relative src)
    assert not re.search(r'(src|href)="(?!data:|#)', html)
    assert "http://" not in html and "https://" not in html
    # every figure of the run folder is embedded, and they decode as PNG
    pngs = sorted(out.rglob("*.png"))
    imgs = re.findall(r'src="data:image/png;base64,([^"]+)"', html)
    assert len(imgs) == len(pngs) >= 5 * 3
    assert all(base64.b64decode(b)[:8] == b"\x89PNG\r\n\x1a\n" for b in imgs)
    # the summary table, the fit parameters with uncertainties, provenance and cautions
    assert '<h2 id="screening">Screening</h2>' in html
    for r in summary["screening"]:
        assert f">{r['name']}<" in html
    assert "Fit to the measured spectrum" in html and "1σ" in html
    assert DEFAULT_PARAMETER_SET in html and "settings and provenance" in html
    assert all(escape(c) in html for c in CAUTIONS) and "Invented" in html
    assert (out / "figure.png").read_bytes()[:4] == b"\x89PNG"
    assert (out / "figure.pdf").read_bytes()[:5] == b"%PDF-"


def test_demo_fits_the_invented_measurements(demo_run):
    # the invented spectra were made with a +0.12 eV calibration offset (demo_measurements);
    # the fit must find it to within the broadening-model mismatch (the demo's mesh differs)
    from valband.demo_measurements import INVENTED_SETTINGS

    _, summary = demo_run
    fitted = {r["name"]: r for r in summary["screening"] if r["fit_shift_eV"] is not None}
    assert set(fitted) == set(INVENTED_SETTINGS["candidates"])
    for r in fitted.values():
        assert r["fit_shift_eV"] == pytest.approx(INVENTED_SETTINGS["calibration_offset_eV"],
                                                  abs=0.05)


def test_report_of_a_single_command(tmp_path, capsys):
    from valband.cli.main import main

    assert main(["dos", "Cu fcc", "--mesh", "6", "--quiet", "--out", "cu"]) == 0
    assert main(["report", "cu", "--figure", "cu.pdf", "--title", "Cu check"]) == 0
    html = Path("cu/report.html").read_text(encoding="utf-8")
    assert "<title>Cu check</title>" in html and "d-band descriptors" in html
    assert Path("cu.pdf").read_bytes()[:5] == b"%PDF-"
    assert "wrote" in capsys.readouterr().err


def test_report_errors(tmp_path):
    with pytest.raises(InputError, match="not a folder"):
        build_report(tmp_path / "missing")
    with pytest.raises(InputError, match="no summary.json"):
        build_report(tmp_path)
    (tmp_path / "summary.json").write_text("{not json")
    with pytest.raises(InputError, match="not a readable valband summary"):
        build_report(tmp_path)
    (tmp_path / "summary.json").write_text('{"schema": "something else"}')
    with pytest.raises(InputError, match="not a valband summary"):
        build_report(tmp_path)
    with pytest.raises(InputError, match="accepted .png, .pdf, .svg"):
        main_figure(tmp_path, tmp_path / "fig.jpg")


def test_report_cli_error_is_one_line(tmp_path, capsys):
    from valband.cli.main import main

    assert main(["report", str(tmp_path / "nothing")]) == 1
    err = capsys.readouterr().err.strip()
    assert "not a folder" in err and len(err.splitlines()) == 1
