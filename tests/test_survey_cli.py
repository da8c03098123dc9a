"""Command line: survey and upgrade on the invented demo survey (serial and on a 2-worker LocalCluster)."""
import json
import os
import subprocess
import sys

import pytest

from convlib.cli import main


def _json(capsys, argv):
    code = main(argv)
    out = capsys.readouterr().out
    return code, json.loads(out)


def test_survey_json_lists_every_demo_line(capsys):
    code, data = _json(capsys, ["survey", "--demo", "--samples", "20", "--json"])
    assert code == 0 and data["errors"] == []
    s = data["survey"]
    assert len(s["tag"]) == 12 and set(s["service"]) == {"hot", "cold"}
    assert all(a <= b <= c for a, b, c in zip(s["excess_kwh_p5"], s["excess_kwh_p50"], s["excess_kwh_p95"]))
    assert any("asbestos" in c for c in data["cautions"]) and any("Local codes" in c for c in data["cautions"])


def test_upgrade_on_threads_cluster_equals_serial(capsys):
    argv = ["upgrade", "--demo", "--samples", "20", "--json"]
    _, serial = _json(capsys, argv)
    _, dask = _json(capsys, argv + ["--workers", "2", "--threads", "--chunk-size", "3"])
    assert serial["ranked"] == dask["ranked"] and serial["totals"] == dask["totals"]
    assert [r for r in serial["ranked"]["rank"]] == list(range(1, 13))
    assert serial["totals"]["hot"]["lines"] == 9 and serial["totals"]["cold"]["lines"] == 3


def test_upgrade_with_steam_priced_per_tonne(capsys):
    _, gas = _json(capsys, ["upgrade", "--demo", "--samples", "10", "--json", "--fuel-price", "0.05",
                            "--efficiency", "1"])
    _, steam = _json(capsys, ["upgrade", "--demo", "--samples", "10", "--json", "--steam-price", "40",
                              "--steam-pressure", "10bar", "--condensate-temperature", "100degC"])
    # steam at 40 per tonne and about 655 kWh/t (CoolProp water; IAPWS-IF97 check in test_economics) is ~0.061/kWh
    ratio = steam["totals"]["hot"]["saving_p50"] / gas["totals"]["hot"]["saving_p50"]
    assert 1.15 < ratio < 1.30


def test_bad_rows_exit_1_and_bad_options_exit_2(tmp_path, capsys):
    f = tmp_path / "s.csv"
    f.write_text("tag,nps,fluid_temperature[degC],insulation_thickness[mm],design_conductivity[W/m/K],"
                 "surface_temperature[degC],air_temperature[degC]\nA,4,150,50,0.04,35,20\nB,4,150,50,0.04,10,20\n")
    assert main(["survey", str(f), "--samples", "5"]) == 1
    out = capsys.readouterr().out
    assert "! row 3 B" in out and "surface_temperature" in out
    assert main(["survey", "--samples", "5"]) == 2
    assert "survey file" in capsys.readouterr().err
    assert main(["upgrade", str(f), "--output", str(tmp_path / "r.txt")]) == 2


def test_cli_writes_parquet(tmp_path):
    pq = pytest.importorskip("pyarrow.parquet")
    env = dict(os.environ, PYTHONPATH=os.getcwd())
    target = tmp_path / "ranked.parquet"
    r = subprocess.run([sys.executable, "-m", "convlib", "upgrade", "--demo", "--samples", "10", "--output",
                        str(target)], capture_output=True, text=True, env=env, cwd=tmp_path, timeout=300)
    assert r.returncode == 0, r.stderr
    assert "rank" in r.stdout and "hot lines (heat lost)" in r.stdout and "cold lines (heat gained)" in r.stdout
    assert pq.read_table(target).num_rows >= 12


def test_survey_table_counts_condensing_hours_of_cold_outdoor_lines(capsys):
    assert main(["survey", "--demo", "--samples", "10"]) == 0
    out = capsys.readouterr().out
    assert "condensing [h/yr]" in out
    roof = next(line for line in out.splitlines() if line.startswith("FS-303"))   # the only cold outdoor demo line
    assert roof.split()[-1].isdigit()
    boiler = next(line for line in out.splitlines() if line.startswith("FS-101"))  # hot, indoor: not counted
    assert boiler.split()[-1] == "-"
