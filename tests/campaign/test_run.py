"""Running campaigns: failures recorded, incompatible databases refused, export, plots."""

from __future__ import annotations

import csv
import sqlite3

import pytest

from valband.campaign import (
    SerialExecutor,
    export_csv,
    load_campaign,
    plot_campaign,
    read_rows,
    run_campaign,
)
from valband.defaults import DEFAULT_PARAMETER_SET
from valband.errors import InputError

from .campaigns import SMALL, write


@pytest.fixture(scope="module")
def finished(tmp_path_factory):
    """The small campaign run once, in process (module-scoped: several tests read it)."""
    folder = tmp_path_factory.mktemp("run")
    camp = load_campaign(write(folder, SMALL))
    db = folder / "results.sqlite"
    summary = run_campaign(camp, db, workers=0, progress=False)
    return camp, db, summary


def test_failures_are_recorded_and_the_rest_finish(finished):
    camp, db, summary = finished
    rows = {r["system"] + ":" + r["structure"]: r for r in read_rows(db)}
    assert summary.computed == len(camp.candidates) == len(rows) == 6
    assert summary.failed == 1
    missing = rows["missing:Zr hcp"]
    assert missing["status"] == "failed" and missing["error_type"] == "ParameterError"
    assert "Zr" in missing["error"] and missing["descriptors"] is None
    cpa = rows["cpa:Cu fcc"]          # a pure metal: its own CPA (exact limit)
    assert cpa["status"] == "done" and cpa["results"]["dos"]["method"] == "lorentzian"
    done = [r for r in rows.values() if r["status"] == "done"]
    assert len(done) == 5
    for r in done:
        d = r["descriptors"]["d"]
        # d-band centre below E_F and a filling of a late transition metal (common practice)
        assert -6.0 < d["cell"]["centre"] < 0.0 and 0.5 < d["cell"]["filling"] <= 1.0
        assert r["wall_s"] > 0 and r["finished_utc"] >= r["started_utc"]
        assert r["provenance"]["seed"] == r["seed"] == r["inputs"]["seed"]
        assert r["provenance"]["parameter_set"]["name"] == DEFAULT_PARAMETER_SET
    # CPA and KPM run on the default set's orthogonal counterpart, and say so
    assert cpa["provenance"]["parameter_set_used"]["name"].startswith(DEFAULT_PARAMETER_SET + "-orth")
    kpm = rows["kpm:Cu3Pd L12"]
    assert kpm["provenance"]["parameter_set_used"]["name"] == DEFAULT_PARAMETER_SET + "-orth"
    assert kpm["results"]["dos"]["method"] == "kpm" and kpm["results"]["dos"]["n_vectors"] == 2


def test_rerun_computes_nothing_and_retry_recomputes_failures(finished):
    camp, db, _ = finished
    again = run_campaign(camp, db, workers=0, progress=False)
    assert (again.computed, again.skipped) == (0, 6)
    retry = run_campaign(camp, db, executor=SerialExecutor(), progress=False, retry_failed=True)
    assert (retry.computed, retry.failed, retry.skipped) == (1, 1, 5)


def test_database_of_another_campaign_is_refused(finished, tmp_path):
    _, db, _ = finished
    other = load_campaign(write(tmp_path, SMALL.replace("step = 0.5", "step = 0.25")))
    before = read_rows(db)
    with pytest.raises(InputError, match=r"belongs to campaign 'small-test'.*fingerprint"):
        run_campaign(other, db, workers=0, progress=False)
    assert read_rows(db) == before
    junk = tmp_path / "junk.sqlite"
    junk.write_text("not a database at all\n" * 100)
    with pytest.raises(InputError, match="not an SQLite database"):
        run_campaign(other, junk, workers=0, progress=False)
    foreign = tmp_path / "foreign.sqlite"
    with sqlite3.connect(foreign) as con:
        con.execute("CREATE TABLE things (x)")
    with pytest.raises(InputError, match="not a valband campaign database"):
        run_campaign(other, foreign, workers=0, progress=False)


def test_unreachable_scheduler_is_a_clear_error_and_loses_nothing(finished, tmp_path):
    camp, db, _ = finished
    before = read_rows(db)
    fresh = load_campaign(write(tmp_path, SMALL.replace("seed = 11", "seed = 99")))
    with pytest.raises(InputError, match=r"cannot reach the Dask scheduler at 'tcp://127\.0\."
                                         r"0\.1:9'.*database is unchanged"):
        run_campaign(fresh, tmp_path / "new.sqlite", scheduler="tcp://127.0.0.1:9",
                     progress=False, connect_timeout=1.0)
    with pytest.raises(InputError, match="cannot reach"):
        run_campaign(camp, db, scheduler="tcp://127.0.0.1:9", progress=False,
                     connect_timeout=1.0, retry_failed=True)
    assert read_rows(db) == before


def test_export_csv(finished, tmp_path):
    camp, db, _ = finished
    out = export_csv(db, tmp_path / "table.csv", camp)
    lines = out.read_text().splitlines()
    assert lines[0].startswith("# valband campaign results, schema_version")
    rows = list(csv.DictReader(line for line in lines if not line.startswith("#")))
    assert len(rows) == 6
    by = {(r["system"], r["structure"]): r for r in rows}
    cu, pd = by["CuPd", "Cu fcc"], by["CuPd", "Pd fcc"]
    assert float(cu["x_Cu"]) == 1.0 and float(pd["x_Pd"]) == 1.0 and float(pd["x_Cu"]) == 0.0
    zr = by["missing", "Zr hcp"]
    assert zr["status"] == "failed" and "Zr" in zr["error"] and zr["x_Cu"] == ""
    assert float(cu["d_centre"]) == pytest.approx(float(cu["d_centre_Cu"]))


def test_plots_for_binary_ternary_and_plain_systems(finished, tmp_path):
    _, db, _ = finished
    files = plot_campaign(db, tmp_path / "fig.png", "d_centre")
    names = sorted(p.name for p in files)
    assert names == ["fig-CuPd.png", "fig-cpa.png", "fig-kpm.png"]
    assert all(p.stat().st_size > 5000 for p in files)
    with pytest.raises(InputError, match="available: .*d_centre"):
        plot_campaign(db, tmp_path / "fig.png", "d_middle")
    text = SMALL.replace('elements = ["Cu", "Pd"]\nstep = 0.5',
                         'elements = ["Cu", "Pd", "Ag"]\nstep = 0.5')
    tern = load_campaign(write(tmp_path, text, "ternary.toml"))
    tdb = tmp_path / "ternary.sqlite"
    run_campaign(tern, tdb, workers=0, progress=False)
    files = plot_campaign(tdb, tmp_path / "tri.svg", "d_width")
    assert "tri-CuPdAg.svg" in [p.name for p in files]
    assert "<svg" in (tmp_path / "tri-CuPdAg.svg").read_text()[:500]


def test_cli_screen_runs_exports_plots_and_reports_errors(tmp_path, capsys):
    from valband.cli.main import main

    camp = write(tmp_path, SMALL)
    rc = main(["screen", str(camp), "--workers", "0", "--db", str(tmp_path / "c.sqlite"),
               "--export", str(tmp_path / "c.csv"), "--plot", str(tmp_path / "c.png")])
    assert rc == 0
    err = capsys.readouterr().err
    assert "6 computed (1 failed)" in err and "c-CuPd.png" in err
    assert (tmp_path / "c.csv").exists() and (tmp_path / "c-CuPd.png").exists()
    bad = write(tmp_path, SMALL.replace("mesh = 4", "mesh = -4"), "bad.toml")
    assert main(["screen", str(bad), "--workers", "0"]) == 1
    assert "key 'defaults.kmesh.mesh'" in capsys.readouterr().err
