"""The invented demo site tells one story per tag: a tag names the same line (size, length, temperatures) in the
demo study, the demo site of `convlib demo`, its operation cases and the demo line list.

The data are invented (our own demo plant); this checks only that they agree with each other. NPS outside
diameters: ASME B36.10M-2018 Table 1 (NPS 1 = 33.4 mm, 2 = 60.3, 3 = 88.9, 4 = 114.3, 5 = 141.3, 6 = 168.3, 8 = 219.1, 10 = 273.0,
12 = 323.8 mm).
"""
import csv
import io
import json
import re
from importlib import resources

import pytest

NPS_OD_MM = {1: 33.4, 2: 60.3, 3: 88.9, 4: 114.3, 5: 141.3, 6: 168.3, 8: 219.1, 10: 273.0, 12: 323.8}  # ASME B36.10M


def _data(name):
    return resources.files("convlib").joinpath(f"data/{name}").read_text()


def _line_list():
    rows = csv.DictReader(io.StringIO("".join(l for l in _data("demo_lines.csv").splitlines(True)
                                              if not l.startswith("#"))))
    out = {}
    for row in rows:
        diameter = (NPS_OD_MM[int(row["nps"])] if row["nps"] else float(row["outer_diameter[mm]"])) / 1000
        out[row["tag"]] = {"diameter": diameter, "length": float(row["length[m]"]),
                           "fluid_temperature": float(row["fluid_temperature[degC]"]) + 273.15,
                           "air_temperature": float(row["air_temperature[degC]"]) + 273.15,
                           "description": row["description"]}
    return out


def _mentions():
    """(source, tag, facts) for every tagged item of the demo files."""
    site = json.loads(_data("demo_site.json"))
    for item in site["surfaces"]:
        yield "demo site surfaces", item["tag"], {"diameter": item.get("diameter"), "length": item["length"],
                                                  "fluid_temperature": None,
                                                  "air_temperature": item["air_temperature"]}
    for item in site["insulated_lines"]:
        yield "demo site lines", item["tag"], {"diameter": NPS_OD_MM[item["nps"]] / 1000, "length": item["length"],
                                               "fluid_temperature": item["fluid_temperature"],
                                               "air_temperature": item["air_temperature"]}
    for key, item in site["operation"].items():
        yield f"demo site operation {key}", item["tag"], {}
    study = json.loads(_data("demo_study.json"))
    tag = re.search(r"FH-\w+", study["name"])[0]
    case = study["case"]
    yield "demo study", tag, {"diameter": case["diameter"], "length": case["length"],
                              "fluid_temperature": case["fluid_temperature"],
                              "air_temperature": case["air_temperature"]}


@pytest.mark.parametrize("source, tag, facts", list(_mentions()), ids=lambda v: v if isinstance(v, str) else "")
def test_a_tag_means_one_line_everywhere(source, tag, facts):
    listed = _line_list()
    if not tag.startswith("FH-1") or tag in ("FH-150", "FH-160", "FH-170", "FH-180"):
        # tanks, ducts and the lines studied only in operation are not on the line list: their tags must not be
        assert tag not in listed, f"{source}: {tag} is on the line list as {listed[tag]['description']!r}"
        return
    assert tag in listed, f"{source}: {tag} is not on the demo line list"
    line = listed[tag]
    for name, value in facts.items():
        if value is not None:
            assert value == pytest.approx(line[name], abs=0.01), f"{source}: {tag} {name} {value} vs {line[name]}"


def test_every_tag_has_one_description_per_file():
    seen = {}
    for source, tag, _ in _mentions():
        assert (source, tag) not in seen, f"{tag} twice in {source}"
        seen[(source, tag)] = True
