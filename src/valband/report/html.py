"""One self-contained HTML report of a run folder: tables, embedded figures, provenance, cautions.

:func:`build_report` reads every ``summary.json`` under a run folder (the folder's own first,
then its sub-folders in name order), and writes ``report.html`` with

* the cautions (model estimates; local rules for X-ray/UV sources and vacuum equipment);
* a screening table when the run is a demo (or any summary with a ``screening`` list);
* one section per summary: command, structure, Fermi level, descriptor tables, spectrum
  settings, the fit parameters with uncertainties, χ², R-factor and band centres, every figure
  of that folder (PNG or SVG, embedded as ``data:`` URIs — no network, no side files), and the
  full settings and provenance as JSON in a collapsible block.

The page has no scripts from elsewhere; one inline script counts the figures that decoded and
writes the count into ``<body data-figures-loaded=…>`` so a headless browser can check it.
"""

from __future__ import annotations

import base64
import html
import json
from pathlib import Path

from valband.errors import InputError
from valband.output import SCHEMA_VERSION, atomic_write

__all__ = ["build_report", "REPORT_NAME", "CAUTIONS", "find_summaries"]

REPORT_NAME = "report.html"
CAUTIONS = (
    "valband's results are model estimates from a tight-binding parameter set, not "
    "measurements; check them against your own knowledge of the material.",
    "When you measure, follow your laboratory's rules for X-ray and UV sources and for vacuum "
    "equipment.",
)
_FIGURES = (".png", ".svg")
_MIME = {".png": "image/png", ".svg": "image/svg+xml"}

_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:2rem auto;max-width:70rem;
color:#1d2327;line-height:1.45;padding:0 1rem}
h1{font-size:1.6rem;margin-bottom:.2rem} h2{font-size:1.25rem;border-bottom:2px solid #283593;
padding-bottom:.2rem;margin-top:2.2rem} h3{font-size:1.05rem;margin-bottom:.3rem}
.caution{background:#fff4e5;border-left:4px solid #ef6c00;padding:.6rem 1rem;margin:1rem 0}
table{border-collapse:collapse;margin:.5rem 0 1rem;font-size:.9rem}
th,td{border:1px solid #c9ced6;padding:.25rem .6rem;text-align:right}
th{background:#eef0f7} td.l,th.l{text-align:left}
figure{display:inline-block;margin:.5rem 1rem .5rem 0;vertical-align:top}
figure img{max-width:34rem;width:100%;border:1px solid #e1e4ea}
figcaption{font-size:.8rem;color:#555}
details{margin:.5rem 0 1.5rem} pre{background:#f6f7f9;padding:.6rem;overflow-x:auto;
font-size:.78rem}
.meta{color:#555;font-size:.85rem}
"""

_SCRIPT = """
window.addEventListener('load', function () {
  var imgs = document.querySelectorAll('img.figure'), ok = 0;
  imgs.forEach(function (im) { if (im.complete && im.naturalWidth > 0) { ok += 1; } });
  document.body.setAttribute('data-figures-loaded', String(ok));
  document.body.setAttribute('data-figures-total', String(imgs.length));
});
"""


def _e(x) -> str:
    return html.escape(str(x), quote=True)


def _num(x, fmt: str = ".3f") -> str:
    if x is None:
        return "—"
    try:
        return format(float(x), fmt)
    except (TypeError, ValueError):
        return _e(x)


def find_summaries(run_dir: Path) -> list[Path]:
    """``summary.json`` files of a run folder: its own first, then sub-folders in name order."""
    top = run_dir / "summary.json"
    subs = sorted((p for p in run_dir.rglob("summary.json") if p != top),
                  key=lambda p: p.parent.relative_to(run_dir).parts)
    return ([top] if top.exists() else []) + subs


def _read(path: Path) -> dict:
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise InputError(f"{path}: not a readable valband summary ({exc})") from None
    if not isinstance(data, dict) or data.get("schema") != "valband.summary":
        raise InputError(f"{path}: not a valband summary (schema 'valband.summary' expected)")
    return data


def _figure(path: Path, root: Path) -> str:
    data = base64.b64encode(path.read_bytes()).decode("ascii")
    rel = path.relative_to(root).as_posix()
    return (f'<figure><img class="figure" alt="{_e(rel)}" '
            f'src="data:{_MIME[path.suffix.lower()]};base64,{data}">'
            f"<figcaption>{_e(rel)}</figcaption></figure>")


def _table(header: list[str], rows: list[list[str]], left: int = 1) -> str:
    head = "".join(f'<th class="l">{_e(h)}</th>' if i < left else f"<th>{_e(h)}</th>"
                   for i, h in enumerate(header))
    body = "".join("<tr>" + "".join(f'<td class="l">{c}</td>' if i < left else f"<td>{c}</td>"
                                    for i, c in enumerate(r)) + "</tr>" for r in rows)
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def _screening(s: dict) -> str:
    rows = s.get("screening") or []
    if not rows:
        return ""
    keys = [("d_band_centre_eV", "d-band centre (eV)"), ("d_band_width_eV", "width (eV)"),
            ("d_filling", "d filling"), ("d_upper_edge_eV", "upper edge (eV)")]
    extra = [k for k in ("measured_band_centre_eV", "fit_shift_eV", "fit_reduced_chi2")
             if any(k in r for r in rows)]
    names = {"measured_band_centre_eV": "measured VB centre (eV)",
             "fit_shift_eV": "fit shift (eV)", "fit_reduced_chi2": "fit χ²_red"}
    header = ["rank", "candidate", "formula"] + [h for _, h in keys] + [names[k] for k in extra]
    body = [[str(i), _e(r.get("name")), _e(r.get("formula"))]
            + [_num(r.get(k)) for k, _ in keys] + [_num(r.get(k)) for k in extra]
            for i, r in enumerate(rows, 1)]
    note = ""
    if s.get("parameter_set_caution"):
        note = f'<p class="caution">{_e(s["parameter_set_caution"])}</p>'
    return ("<h2 id=\"screening\">Screening</h2>" + _table(header, body, left=3) + note
            + '<p class="meta">Ranked by the model d-band centre (energies relative to E_F). '
            "The measured valence-band centre is the first moment of the background-subtracted "
            "spectrum; cross-section weighting and broadening shift it from the DOS d-band "
            "centre.</p>")


def _descriptors(s: dict) -> str:
    out = []
    for d in s.get("descriptors") or []:
        cols = ["centre", "width", "filling", "skewness", "kurtosis", "upper_edge"]
        rows = [["cell"] + [_num(d["cell"].get(c)) for c in cols]]
        rows += [[_e(el)] + [_num(v.get(c)) for c in cols] for el, v in d["elements"].items()]
        lo, hi = d.get("window_eV", [None, None])
        out.append(f"<h3>{_e(d.get('shell', 'd'))}-band descriptors (window {_num(lo, '.2f')} "
                   f"to {_num(hi, '.2f')} eV)</h3>"
                   + _table(["", "centre (eV)", "width (eV)", "filling", "skewness", "kurtosis",
                             "upper edge (eV)"], rows))
    return "".join(out)


def _fit(s: dict) -> str:
    fit = s.get("fit")
    if not fit:
        return ""
    rows = [[_e(n), _num(p["value"], ".5g"),
             "fixed" if p["error"] is None else _num(p["error"], ".3g"), _e(p["unit"])]
            for n, p in fit["parameters"].items()]
    bc = fit.get("band_centre") or {}
    cal = s.get("calibration")
    text = (f"<p>{fit['n_points']} points, window {_num(fit['window_eV'][0], '.2f')} to "
            f"{_num(fit['window_eV'][1], '.2f')} eV; χ² {_num(fit['chi2'], '.5g')}, reduced χ² "
            f"{_num(fit['reduced_chi2'], '.4g')} (dof {fit['dof']}), R-factor "
            f"{_num(fit['r_factor'], '.4g')} (Σ|measured − model| / Σ|measured|); background "
            f"{_e(fit['settings'].get('background'))}.</p>")
    if bc.get("measured_eV") is not None:
        text += (f"<p>Band centre over BE {_num(bc['window_eV'][0], '.2f')}–"
                 f"{_num(bc['window_eV'][1], '.2f')} eV: measured {_num(bc['measured_eV'])} eV, "
                 f"model spectrum {_num(bc.get('model_spectrum_centre_eV'))} eV, model "
                 f"{_e(bc.get('shell'))} DOS {_num(bc.get('model_dos_centre_eV'))} eV. "
                 f"{_e(bc.get('note', ''))}</p>")
    if cal:
        text += (f"<p>Fermi-edge calibration: E_F at {_num(cal['fermi_level_eV'], '+.4f')} ± "
                 f"{_num(cal['fermi_level_err_eV'], '.4f')} eV on the file's axis, edge FWHM "
                 f"{_num(cal['edge_fwhm_eV'])} eV; shift applied.</p>")
    return ("<h3>Fit to the measured spectrum</h3>"
            + _table(["parameter", "value", "1σ", "unit"], rows) + text)


def _spectrum(s: dict) -> str:
    sp = s.get("spectrum")
    if not sp:
        return ""
    lt = sp.get("lifetime") or {}
    geo = sp.get("geometry") or {}
    xs = "".join(f"<li>{_e(x['element'])} {_e(x['shell'])} ({_e(x['subshell'])}): σ = "
                 f"{_num(x['sigma_per_electron_mb'], '.4g')} Mb/electron, angular factor "
                 f"{_num(x['angular_factor'])}</li>" for x in sp.get("cross_sections", []))
    return (f"<h3>Simulated spectrum</h3><p>hν = {_num(sp.get('photon_energy_eV'), 'g')} eV "
            f"{_e(sp.get('photon_source') or '')}, T = {_num(sp.get('temperature_K'), 'g')} K, "
            f"Gaussian FWHM {_num(sp.get('gaussian_fwhm_eV'), 'g')} eV, lifetime HWHM "
            f"{_num(lt.get('gamma0_eV'), 'g')} + {_num(lt.get('a_per_eV'), 'g')}·(E − E_F)² eV, "
            f"θ = {_num(geo.get('theta_deg'), '.2f')}° ({_e(geo.get('polarization'))}).</p>"
            f"<ul>{xs}</ul>")


def _section(path: Path, s: dict, root: Path, index: int) -> str:
    folder = path.parent
    rel = folder.relative_to(root).as_posix() if folder != root else "."
    prov = s.get("provenance") or {}
    struct = prov.get("structure") or {}
    pset = prov.get("parameter_set") or s.get("parameter_set") or {}
    title = f"{s.get('command', '?')} — {struct.get('formula', '') or rel}"
    meta = [f"folder <code>{_e(rel)}</code>", f"valband {_e(s.get('valband_version'))}",
            f"created {_e(s.get('created_utc'))}"]
    if pset:
        meta.append(f"parameter set {_e(pset.get('name'))} {_e(pset.get('version', ''))}")
    body = [f'<h2 id="s{index}">{_e(title)}</h2><p class="meta">{" · ".join(meta)}</p>']
    if s.get("fermi_level_eV") is not None:
        st = s.get("settings") or {}
        mesh = st.get("mesh") or {}
        body.append(f"<p>E_F = {_num(s['fermi_level_eV'], '.4f')} eV (model scale), "
                    f"{_num(s.get('n_electrons'), 'g')} valence electrons, DOS(E_F) "
                    f"{_num(s.get('dos_at_fermi_states_per_eV_cell'))} states/eV/cell; mesh "
                    f"{_e(mesh.get('mesh', mesh) if isinstance(mesh, dict) else mesh)}, method "
                    f"{_e(st.get('method'))}, width {_e(st.get('width'))} eV.</p>")
    body += [_descriptors(s), _spectrum(s), _fit(s)]
    figs = sorted(p for p in folder.iterdir() if p.suffix.lower() in _FIGURES and p.is_file())
    if figs:
        body.append("<div>" + "".join(_figure(p, root) for p in figs) + "</div>")
    detail = {k: s[k] for k in ("settings", "provenance", "files") if k in s}
    if s.get("fit"):
        detail["fit_settings"] = s["fit"].get("settings")
        detail["fit_provenance"] = s["fit"].get("provenance")
    body.append("<details><summary>settings and provenance (JSON)</summary><pre>"
                + _e(json.dumps(detail, indent=1, ensure_ascii=False, default=str))
                + "</pre></details>")
    return "".join(body)


def build_report(run_dir: str | Path, out: str | Path | None = None,
                 title: str | None = None) -> Path:
    """Write the self-contained HTML report of ``run_dir``; return its path.

    ``out`` defaults to ``RUN_DIR/report.html``. Raises InputError when the folder has no
    valband summary or a summary is unreadable.
    """
    root = Path(run_dir)
    if not root.is_dir():
        raise InputError(f"report: {root} is not a folder (give the --out folder of a valband "
                         "run)")
    paths = find_summaries(root)
    if not paths:
        raise InputError(f"report: no summary.json in {root} or its sub-folders; run a valband "
                         "command with --out first")
    summaries = [(p, _read(p)) for p in paths]
    top = summaries[0][1]
    heading = title or top.get("scenario") or f"valband {top.get('command', '')} report"
    toc = "".join(f'<li><a href="#s{i}">{_e(s.get("command"))} — '
                  f'{_e(p.parent.relative_to(root).as_posix() or ".")}</a></li>'
                  for i, (p, s) in enumerate(summaries))
    notes = [top["note"]] if top.get("note") else []
    parts = [
        "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\">",
        f"<meta name=\"valband-report-schema\" content=\"{SCHEMA_VERSION}\">",
        f"<title>{_e(heading)}</title><style>{_CSS}</style></head><body>",
        f"<h1>{_e(heading)}</h1>",
        f'<p class="meta">valband report of <code>{_e(root.resolve().name)}</code>, '
        f"{len(summaries)} result(s).</p>",
        *[f'<p class="caution">{_e(n)}</p>' for n in notes],
        *[f'<p class="caution">{_e(c)}</p>' for c in CAUTIONS],
        _screening(top),
        f"<h2>Contents</h2><ol>{toc}</ol>",
        *[_section(p, s, root, i) for i, (p, s) in enumerate(summaries)],
        "<h2>Cautions</h2>", *[f'<p class="caution">{_e(c)}</p>' for c in CAUTIONS],
        f"<script>{_SCRIPT}</script></body></html>",
    ]
    target = Path(out) if out is not None else root / REPORT_NAME
    with atomic_write(target, "w") as fh:
        fh.write("\n".join(parts))
    return target
