"""Portfolio runs on a dask.distributed cluster give the rows of the local process pool.

A real ``LocalCluster`` (2 worker processes) is started; the same small portfolio is screened
through ``batch --scheduler ADDRESS`` (the command line, in a subprocess whose stderr is a pipe)
and through ``screen.screen_portfolio(..., executor=distributed.Client)``, and compared with the
local pool (``--workers 2``). Reference: the local pool itself (two paths through the same
engine); the example cases are invented demo data, never check values.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys

import pytest

distributed = pytest.importorskip("distributed")

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
CASES = ("esterification_batch.toml", "grignard_semibatch.toml", "nitration_semibatch.toml")


@pytest.fixture(scope="module")
def portfolio(tmp_path_factory):
    folder = tmp_path_factory.mktemp("portfolio")
    for name in CASES:
        shutil.copy(os.path.join(ROOT, "cases", name), folder / name)
    (folder / "broken.toml").write_text('[case]\ntitle = "broken"\n', encoding="utf-8")
    return folder


@pytest.fixture(scope="module")
def cluster():
    from distributed import LocalCluster

    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                      dashboard_address=":0", silence_logs=50) as running:
        yield running


def _batch_json(*args):
    env = dict(os.environ, RUNAWAY_SCREEN_TIMESTAMP="2026-01-01T00:00:00+00:00")
    completed = subprocess.run([sys.executable, "-m", "screen", "batch", *map(str, args),
                                "--json", "--allow-errors"], capture_output=True, text=True,
                               env=env, timeout=300)
    assert completed.returncode == 0, completed.stderr
    return json.loads(completed.stdout), completed.stderr


@pytest.fixture(scope="module")
def local(portfolio):
    """The portfolio screened by the local process pool (2 workers)."""
    import screen

    return screen.screen_portfolio(portfolio, workers=2,
                                   generated_at="2026-01-01T00:00:00+00:00")


def test_batch_on_the_cluster_equals_the_local_pool(portfolio, cluster, local):
    from screen.cli.batch import _json_rows

    remote, stderr = _batch_json(portfolio, "--scheduler", cluster.scheduler_address)
    assert stderr == ""  # a successful piped run is silent, on a cluster too
    assert remote["files"] == 4
    assert remote["rows"] == json.loads(json.dumps(_json_rows(local)))  # value for value
    assert remote["rows_with_errors"] == 1


def test_python_api_with_a_client_equals_the_local_pool(portfolio, cluster, local):
    import pandas as pd

    import screen

    with distributed.Client(cluster) as client:
        remote = screen.screen_portfolio(portfolio, executor=client,
                                         generated_at="2026-01-01T00:00:00+00:00")
    assert len(remote) == 1 + 1 + 1 + 3  # broken, two cases with one vessel, one with three
    pd.testing.assert_frame_equal(remote, local, check_exact=True)
    assert remote.attrs["cautions"] == local.attrs["cautions"]


def test_monte_carlo_blocks_on_the_cluster_equal_the_local_run(cluster):
    """The blocks of samples run on the workers; the samples are drawn by the caller, so the
    block is the same number for number."""
    import screen

    path = os.path.join(ROOT, "cases", "esterification_uncertain.toml")
    local = screen.uncertainty(path, samples=25_000, seed=9)
    with distributed.Client(cluster) as client:
        remote = screen.uncertainty(path, samples=25_000, seed=9, executor=client)
    assert json.dumps(remote.to_json_dict(), default=float) == \
        json.dumps(local.to_json_dict(), default=float)
