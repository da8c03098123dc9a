"""Dask scale-out: a 2-worker LocalCluster gives the serial numbers bit for bit; outputs and per-row errors."""
import numpy as np
import pytest

from convlib.design import WeatherBins
from convlib.scale import run_study, write_rows
from convlib.survey import Measurement, demo_survey_path
from convlib.upgrade import CostTable, StudySettings, demo_costs_path

pytest.importorskip("distributed")
pa = pytest.importorskip("pyarrow")


def _settings():
    bins = WeatherBins([268.15, 281.15, 293.15], [4.0, 2.0, 1.0], [1500, 4500, 2760])
    return StudySettings(bins, CostTable.read(demo_costs_path()), Measurement(samples=25, seed=7))


def _long_list(copies=3):
    lines = [ln for ln in demo_survey_path().read_text().splitlines() if not ln.startswith("#")]
    bad = "BAD-1,nowhere,outdoor,4,40,10,150,50,0.04,0.9,10,20,0,0,8760"  # jacket below the air on a hot line
    body = []
    for c in range(copies):
        body += [ln.replace("FS-", f"C{c}-") for ln in lines[1:]]
        body.append(bad.replace("BAD-1", f"BAD-{c}"))
    return lines[0] + "\n" + "\n".join(body) + "\n"


def _assert_same(a, b):
    assert a.rows.keys() == b.rows.keys()
    for k in a.rows:
        if a.rows[k].dtype == object:
            assert a.rows[k].tolist() == b.rows[k].tolist(), k
        else:
            np.testing.assert_array_equal(a.rows[k], b.rows[k], err_msg=k)  # bit-identical, NaN == NaN
    assert a.errors == b.errors


@pytest.mark.parametrize("processes", [False, True], ids=["threads", "processes"])
def test_two_worker_cluster_matches_serial(processes, tmp_path):
    text = _long_list()
    serial = run_study(text, _settings())
    chunked = run_study(text, _settings(), workers=2, chunk_size=5, processes=processes)
    _assert_same(serial, chunked)
    assert [e.tag for e in serial.errors] == ["BAD-0", "BAD-1", "BAD-2"]
    assert [e.index for e in serial.errors] == [12, 25, 38]  # global row numbers, not per chunk


def test_outputs_parquet_and_csv_round_trip(tmp_path):
    import pyarrow.parquet as pq
    out = run_study(_long_list(1), _settings())
    written = write_rows(out.rows, tmp_path / "r.parquet", out.errors)
    assert [p.name for p in written] == ["r.parquet", "r_errors.csv"]
    back = pq.read_table(tmp_path / "r.parquet").to_pydict()
    np.testing.assert_array_equal(back["npv_p50"], out.rows["npv_p50"])
    assert back["tag"] == out.rows["tag"].tolist()
    write_rows(out.rows, tmp_path / "r.csv")
    import csv
    rows = list(csv.DictReader((tmp_path / "r.csv").open()))
    assert [float(r["saving_p50"]) for r in rows] == out.rows["saving_p50"].tolist()  # exact: repr round-trips


def test_parquet_input_equals_csv_input(tmp_path):
    import csv
    import io
    import pyarrow.parquet as pq
    text = _long_list(1)
    rows = list(csv.reader(io.StringIO(text)))
    pq.write_table(pa.table({h: [r[j] for r in rows[1:]] for j, h in enumerate(rows[0])}), tmp_path / "in.parquet")
    _assert_same(run_study(text, _settings()), run_study(tmp_path / "in.parquet", _settings()))
