"""Descriptor-versus-composition figures of a campaign (matplotlib, Agg canvas).

Per system of the campaign: a binary grid gets one axes with the quantity against the atomic
fraction of its second element, one line per (structure template, strain, method); a ternary
grid gets a composition triangle per such series, points coloured by the quantity (corner A
bottom left, B bottom right, C top: x = x_B + x_C/2, y = x_C·√3/2); a system of plain
structures gets one bar per structure. Failed candidates are left out. Files are named
``<stem>-<system>[-<series>].<ext>`` next to the requested path.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

from valband.campaign.database import read_rows
from valband.campaign.export import flatten
from valband.errors import InputError

__all__ = ["plot_campaign"]

_MARKERS = "osD^v<>p*h"


def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-") or "system"


def _series_label(row: dict) -> str:
    i = row["inputs"]
    strain = f", strain {i['strain']:+g}" if i["strain"] else ""
    return f"{i['template']}{strain} [{i['method']}]"


def _label(quantity: str) -> str:
    parts = quantity.split("_")
    unit = "" if parts[1] in ("filling", "skewness", "kurtosis", "n") else " (eV)"
    return quantity.replace("_", " ") + unit


def plot_campaign(db_path: str | Path, out_path: str | Path,
                  quantity: str = "d_centre") -> list[Path]:
    """Write the figures of a results database; return their paths.

    Parameters
    ----------
    db_path : results database
    out_path : ``stem.png`` or ``stem.svg``; one file per system (and ternary series)
    quantity : a column of :func:`valband.campaign.export.flatten`, e.g. ``d_centre``,
        ``d_width_Pd``, ``hv1486.6_centroid_be``

    Raises
    ------
    InputError
        No finished candidate has ``quantity`` (the message lists the available columns).
    """
    from valband.report.plots import new_figure, save_figure

    out_path = Path(out_path)
    suffix = out_path.suffix or ".png"
    if suffix.lower() not in (".png", ".svg"):
        raise InputError(f"--plot {out_path}: accepted suffixes .png and .svg")
    rows = [r for r in read_rows(db_path) if r["status"] == "done"]
    available: set[str] = set()
    by_system: dict[str, list[tuple[dict, float]]] = {}
    for r in rows:
        flat = flatten(r, tuple(r.get("composition") or {}))
        available |= {k for k, v in flat.items() if isinstance(v, float)}
        if flat.get(quantity) is not None:
            by_system.setdefault(r["system"], []).append((r, float(flat[quantity])))
    if not by_system:
        raise InputError(f"plot quantity {quantity!r}: no finished candidate has it; available: "
                         + ", ".join(sorted(available)))
    written = []
    for system, items in by_system.items():
        elements = items[0][0]["inputs"].get("elements") or []
        n_el = len(elements)
        series: dict[str, list[tuple[dict, float]]] = {}
        shared = []  # one-element points: the ends of every series of the system
        for r, v in items:
            comp = r["composition"] or {}
            if comp and sum(1 for x in comp.values() if x > 0) == 1:
                shared.append((r, v))
            else:
                series.setdefault(_series_label(r), []).append((r, v))
        if not series:
            series = {_series_label(r): [] for r, _ in shared[:1]}
        for pts in series.values():
            pts.extend(p for p in shared if p not in pts)
        stem = f"{out_path.stem}-{_slug(system)}"
        if n_el == 3:
            for k, (name, pts) in enumerate(series.items()):
                fig, ax = new_figure(5.6, 4.8)
                _triangle(fig, ax, elements, pts, quantity, f"{system}: {name}")
                tag = f"-{k + 1}" if len(series) > 1 else ""
                written.append(save_figure(fig, out_path.with_name(f"{stem}{tag}{suffix}")))
        else:
            fig, ax = new_figure()
            if n_el == 2:
                _binary(ax, elements, series, quantity, system)
            else:
                _bars(ax, items, quantity, system)
            written.append(save_figure(fig, out_path.with_name(f"{stem}{suffix}")))
    return written


def _binary(ax, elements, series, quantity, system) -> None:
    b = elements[1]
    for k, (name, pts) in enumerate(series.items()):
        pts = sorted(pts, key=lambda p: p[0]["composition"][b])
        x = [p[0]["composition"][b] for p in pts]
        ax.plot(x, [p[1] for p in pts], marker=_MARKERS[k % len(_MARKERS)], lw=1.2, ms=4,
                label=name)
    ax.set_xlabel(f"x ({b} fraction in {elements[0]}$_{{1-x}}${b}$_x$)")
    ax.set_ylabel(_label(quantity))
    ax.set_xlim(-0.02, 1.02)
    ax.set_title(system, fontsize=10)
    ax.legend(frameon=False, fontsize=7)


def _triangle(fig, ax, elements, pts, quantity, title) -> None:
    h = math.sqrt(3.0) / 2.0
    ax.plot([0, 1, 0.5, 0], [0, 0, h, 0], color="0.3", lw=0.8)
    xs = [p[0]["composition"][elements[1]] + 0.5 * p[0]["composition"][elements[2]]
          for p in pts]
    ys = [h * p[0]["composition"][elements[2]] for p in pts]
    sc = ax.scatter(xs, ys, c=[p[1] for p in pts], cmap="viridis", s=60, edgecolors="k",
                    linewidths=0.4, zorder=3)
    fig.colorbar(sc, ax=ax, label=_label(quantity), shrink=0.8)
    for (x, y, ha, va), e in zip(((0, 0, "right", "top"), (1, 0, "left", "top"),
                                  (0.5, h, "center", "bottom")), elements, strict=True):
        ax.text(x, y, f" {e} ", ha=ha, va=va, fontsize=10)
    ax.set_aspect("equal")
    ax.set_xlim(-0.12, 1.12)
    ax.set_ylim(-0.1, h + 0.1)
    ax.axis("off")
    ax.set_title(title, fontsize=9)


def _bars(ax, items, quantity, system) -> None:
    names = [f"{r['structure']} [{r['method']}]" for r, _ in items]
    ax.barh(range(len(items)), [v for _, v in items], color="#283593")
    ax.set_yticks(range(len(items)), names, fontsize=7)
    ax.set_xlabel(_label(quantity))
    ax.set_title(system, fontsize=10)
