"""The command line end to end, through a subprocess as a user runs it."""
import json
import subprocess
import sys

import pytest

import convlib as cl
from convlib.demo import load_demo_site


def run(*args):
    return subprocess.run([sys.executable, "-m", "convlib", *args], capture_output=True, text=True, timeout=120)


def test_demo_table_lists_every_demo_surface_with_cautions():
    proc = run("demo")
    assert proc.returncode == 0, proc.stderr
    site = load_demo_site()
    for case in site["surfaces"]:
        assert case["tag"] in proc.stdout
    assert "invented" in proc.stdout.lower()
    assert "Caution" in proc.stdout


def test_surface_json_matches_library_with_units_converted():
    proc = run("surface", "--diameter", "4.5in", "--surface-temperature", "90degC", "--air-temperature", "68degF",
               "--wind-speed", "2", "--emissivity", "0.8", "--json")
    assert proc.returncode == 0, proc.stderr
    payload = json.loads(proc.stdout)["surface"]
    row = payload["results"][0]
    assert payload["units"]["q_per_length"] == "W/m"
    # 4.5 in = 0.1143 m and 68 degF = 20 degC exactly (definitions of the inch and the Fahrenheit scale)
    direct = cl.bare_surface(surface_temperature=363.15, air_temperature=293.15, diameter=0.1143, length=1.0,
                             wind_speed=2.0, emissivity=0.8)
    assert row["q_per_length"] == pytest.approx(float(direct.q_per_length), rel=1e-9)
    assert row["air_temperature"] == pytest.approx(293.15, abs=1e-9)


@pytest.mark.parametrize("args, field", [
    (("--diameter", "-3", "--surface-temperature", "90degC", "--air-temperature", "20degC"), "diameter"),
    (("--diameter", "3 kg", "--surface-temperature", "90degC", "--air-temperature", "20degC"), "diameter"),
    (("--diameter", "0.1m", "--surface-temperature", "90degC", "--air-temperature", "20degC",
      "--emissivity", "1.4"), "emissivity"),
    (("--diameter", "0.1m", "--air-temperature", "20degC"), "surface-temperature"),
    (("--diameter", "0.1m", "--surface-temperature", "90degC", "--air-temperature", "20degC",
      "--natural", "nobody"), "churchill_chu"),
])
def test_bad_input_exits_2_with_one_line_naming_the_field(args, field):
    proc = run("surface", *args)
    assert proc.returncode == 2
    assert field in proc.stderr
    assert "Traceback" not in proc.stderr


def test_correlations_listing_json_has_every_registry_record():
    proc = run("correlations", "--json")
    assert proc.returncode == 0
    records = json.loads(proc.stdout)
    assert {(r["geometry"], r["key"]) for r in records} == {(r.geometry, r.key) for r in cl.correlations.REGISTRY}
    assert all(r["citation"] for r in records)


def test_demo_line_list_end_to_end(tmp_path):
    out = tmp_path / "results.csv"
    proc = run("lines", "--demo", "-o", str(out))
    assert proc.returncode == 0, proc.stderr
    from convlib.linelist import demo_lines_path, read_line_list

    lines, errors = read_line_list(demo_lines_path())
    assert not errors and all(line.spec.tag in proc.stdout for line in lines)
    assert out.read_text().count("\n") == len(lines) + 2  # header, lines, TOTAL


def test_line_list_with_a_bad_row_exits_1_naming_the_row(tmp_path):
    src = tmp_path / "lines.csv"
    src.write_text("tag,nps,length,fluid_temperature[degC],air_temperature[degC],layers[mm]\n"
                   "A-1,4,10,150,20,50@0.04 wool\n"
                   "A-2,4.3,10,150,20,50@0.04 wool\n")
    proc = run("lines", str(src))
    assert proc.returncode == 1
    assert "row 3" in proc.stderr and "A-1" in proc.stdout


def _small_study(tmp_path, wind):
    from convlib.study import CaseSpec, StudySpec, SweepAxis, TornadoInput, UncertaintySpec

    spec = StudySpec(name="cli check", case=CaseSpec(kind="insulated", diameter=0.0603, fluid_temperature=353.15,
                                                      air_temperature=283.15, wind_speed=wind,
                                                      insulation_thickness=0.03),
                     sweeps=[SweepAxis(input="wind_speed", start=0, stop=10, count=5)],
                     tornado=[TornadoInput(input="emissivity", low=0.1, high=0.9)],
                     uncertainty=UncertaintySpec(samples=500, seed=1))
    path = tmp_path / f"study_{wind}.json"
    path.write_text(spec.model_dump_json())
    return path


def test_run_save_verify_compare_end_to_end(tmp_path):
    first, second = tmp_path / "a.json", tmp_path / "b.json"
    proc = run("run", str(_small_study(tmp_path, 2.0)), "--save", str(first), "--author", "checker")
    assert proc.returncode == 0, proc.stderr
    assert "snapshot saved" in proc.stdout and first.exists()
    proc = run("verify", str(first))
    assert proc.returncode == 0 and "AGREES" in proc.stdout
    assert run("run", str(_small_study(tmp_path, 5.0)), "--save", str(second)).returncode == 0
    proc = run("compare", str(first), str(second))
    assert proc.returncode == 0 and "case.wind_speed" in proc.stdout
    # the same file again is refused without --overwrite, and nothing changes
    before = first.read_bytes()
    proc = run("run", str(_small_study(tmp_path, 2.0)), "--save", str(first))
    assert proc.returncode == 2 and "--overwrite" in proc.stderr and first.read_bytes() == before


def test_verify_reports_a_tampered_snapshot_clearly(tmp_path):
    snap = tmp_path / "a.json"
    assert run("run", str(_small_study(tmp_path, 2.0)), "--save", str(snap)).returncode == 0
    text = snap.read_text()
    snap.write_text(text.replace('"wind_speed": 2.0', '"wind_speed": 2.5', 1))
    proc = run("verify", str(snap))
    assert proc.returncode == 2 and "hash" in proc.stderr and "Traceback" not in proc.stderr


def test_report_renders_a_self_contained_html_page(tmp_path):
    snap, page = tmp_path / "a.json", tmp_path / "a.html"
    assert run("run", str(_small_study(tmp_path, 2.0)), "--save", str(snap)).returncode == 0
    proc = run("report", str(snap), "-o", str(page))
    assert proc.returncode == 0, proc.stderr
    html = page.read_text()
    assert "cli check" in html and "<script src=\"http" not in html  # plotly inlined: opens offline
    assert run("report", str(snap), "-o", str(page)).returncode == 2  # no silent overwrite
