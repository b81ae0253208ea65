"""A real dask.distributed cluster on loopback gives the same rows as local processes."""

from __future__ import annotations

import pytest

from valband.campaign import DaskExecutor, LocalExecutor, load_campaign, read_rows, run_campaign

from .campaigns import SMALL, comparable, write

distributed = pytest.importorskip("distributed", reason="the optional extra valband[screen]")


def test_dask_cluster_matches_local_processes(tmp_path):
    camp = load_campaign(write(tmp_path, SMALL))
    with LocalExecutor(2) as ex:
        local = run_campaign(camp, tmp_path / "local.sqlite", executor=ex, progress=False)
    assert local.executor == {"kind": "local-processes", "workers": 2}
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False,
                                  protocol="tcp", host="127.0.0.1",
                                  dashboard_address=None) as cluster:
        address = cluster.scheduler_address
        assert address.startswith("tcp://127.0.0.1:")
        summary = run_campaign(camp, tmp_path / "dask.sqlite", scheduler=address,
                               progress=False)
    assert summary.executor["kind"] == "dask" and summary.executor["workers"] == 2
    assert summary.computed == local.computed == len(camp.candidates)
    assert summary.failed == local.failed == 1
    dask_rows = read_rows(tmp_path / "dask.sqlite")
    local_rows = read_rows(tmp_path / "local.sqlite")
    assert comparable(dask_rows) == comparable(local_rows)  # bit-identical descriptors
    assert {r["executor"]["kind"] for r in dask_rows} == {"dask"}
    assert {r["executor"]["kind"] for r in local_rows} == {"local-processes"}


def test_client_can_be_passed_in(tmp_path):
    camp = load_campaign(write(tmp_path, SMALL))
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  protocol="tcp", host="127.0.0.1",
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster, set_as_default=False) as client:
        ex = DaskExecutor(client=client)
        summary = run_campaign(camp, tmp_path / "d.sqlite", executor=ex, progress=False)
        assert summary.computed == len(camp.candidates)
        assert client.status == "running"  # an executor does not close a client it was given
