"""geomgen model: scale, cuts, Reynolds number, masses; the demo's pieces at 1:10; a small
wing whose failing wall check names its piece; bad model input."""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import numpy as np
import pytest
import trimesh
import yaml
from designs import PROFILES, demo_document, make_design, trapezoid_document

from geomgen.cli import main
from geomgen.errors import InputError
from geomgen.geometry.junction import mount
from geomgen.geometry.layout import lay_out
from geomgen.printed_model import plan as mdl
from geomgen.sizing.aircraft import size

BUILD_VOLUME = (220.0, 220.0, 250.0)  # mm, the printer


# --- pure parts -----------------------------------------------------------------------------------


def test_scale_is_read_as_one_to_n() -> None:
    assert mdl.parse_scale("1:10") == pytest.approx(0.1, rel=1e-15)
    assert mdl.parse_scale("1:12.5") == pytest.approx(0.08, rel=1e-15)
    for bad in ("10", "1:0", "2:10", "1:x"):
        with pytest.raises(InputError) as err:
            mdl.parse_scale(bad)
        assert err.value.path == "--scale"


def test_cuts_make_the_fewest_pieces_that_fit() -> None:
    # a 600 mm part and 238 mm pieces: ceil(600 / 238) = 3 pieces (arithmetic)
    cuts = mdl.plan_cuts(0.0, 600.0, 238.0, [])
    edges = [0.0, *cuts, 600.0]
    assert len(cuts) == 2
    assert all(0 < b - a <= 238.0 for a, b in zip(edges[:-1], edges[1:], strict=True))
    # equal pieces when nothing is in the way
    assert cuts == pytest.approx((200.0, 400.0), abs=0.2)


def test_cuts_stay_off_the_intervals_to_avoid_where_they_can() -> None:
    avoid = [(190.0, 215.0), (380.0, 420.0)]
    cuts = mdl.plan_cuts(0.0, 600.0, 238.0, avoid)
    edges = [0.0, *cuts, 600.0]
    assert all(0 < b - a <= 238.0 for a, b in zip(edges[:-1], edges[1:], strict=True))
    assert all(not (a <= c <= b) for c in cuts for a, b in avoid)
    assert mdl.plan_cuts(0.0, 200.0, 238.0, avoid) == ()  # fits whole


def test_reynolds_number_against_a_hand_computation() -> None:
    # At 288.15 K and 101325 Pa the standard atmosphere's air has rho = 1.2250 kg/m^3 and
    # mu = 1.7894e-5 Pa s (ICAO Doc 7488 / U.S. Standard Atmosphere 1976 sea-level table;
    # Sutherland's law with beta = 1.458e-6 kg/(m s K^0.5) and S = 110.4 K gives it).
    # Re = rho V c / mu by hand for an MGC of 0.12 m at 30 m/s.
    doc = demo_document()
    doc["model"] = {"scale": "1:10", "tunnel": {"speed": "30 m/s", "temperature": "15 degC"}}
    d = make_design(doc)
    layout = mount(lay_out(size(d, (PROFILES,)), (PROFILES,)), (PROFILES,))
    effect = mdl.scale_effect(layout, d.model, 0.1)
    assert effect.tunnel_density == pytest.approx(1.2250, rel=1e-4)
    assert effect.tunnel_viscosity == pytest.approx(1.7894e-5, rel=1e-4)
    c = layout.sizing.wing.planform.mgc * 0.1
    assert effect.model_reynolds == pytest.approx(1.2250 * 30.0 * c / 1.7894e-5, rel=2e-4)
    # geometric similarity: the model's chord is the full chord times the scale, exactly
    assert effect.model_chord == pytest.approx(effect.full_chord * 0.1, rel=1e-15)


def test_deflection_pieces_are_named_by_their_angle() -> None:
    doc = demo_document()
    d = make_design(doc)
    layout = mount(lay_out(size(d, (PROFILES,)), (PROFILES,)), (PROFILES,))
    names = [v.name for v in mdl.deflections(layout, d.model)]
    assert "aileron-right-at-15deg" in names and "aileron-left-at+15deg" in names
    assert "elevator-right-at0deg" in names
    assert "flap-right-at+10deg" in names  # not asked: the design's own deflection
    assert "rudder-at0deg" in names


# --- the demo at 1:10 ----------------------------------------------------------------------------


# demo_model (tests/conftest.py): the demo's printed model at 1:10, made once per session


def test_demo_model_pieces_fit_the_printer_and_are_watertight(demo_model: Path) -> None:
    stls = sorted((demo_model / "stl").glob("*.stl"))
    assert len(stls) > 20
    for path in stls:
        mesh = trimesh.load_mesh(str(path), file_type="stl")
        mesh.merge_vertices()
        assert mesh.is_watertight, path.stem
        # an oriented box that fits 220 x 220 x 250 mm in some axis-parallel placement
        extents = np.sort(mesh.bounding_box_oriented.primitive.extents)
        assert np.all(extents <= np.sort(BUILD_VOLUME) + 1e-6), (path.stem, extents)


def test_demo_model_3mf_reads_back_with_the_same_pieces(demo_model: Path) -> None:
    scene = trimesh.load(str(demo_model / "veyra-t2-model.3mf"))
    names = {p.stem for p in (demo_model / "stl").glob("*.stl")}
    assert set(scene.geometry) == names
    for name in ("wing-right-1", "fuselage-2", "aileron-left-at+15deg"):
        stl = trimesh.load_mesh(str(demo_model / "stl" / f"{name}.stl"), file_type="stl")
        assert scene.geometry[name].volume == pytest.approx(stl.volume, rel=1e-6)


def test_demo_model_checks_all_passed(demo_model: Path) -> None:
    data = json.loads((demo_model / "checks.json").read_text(encoding="utf-8"))
    assert data["passed"] is True
    names = {c["name"] for c in data["checks"]}
    for expected in (
        "mesh is watertight",
        "pieces reassemble to the scaled part minus its holes",
        "3MF reads back with the same pieces and volumes",
    ):
        assert expected in names
    joints = [c for c in data["checks"] if c["part"].startswith("wing-right joint")]
    assert joints and all(c["measured"] <= 0.05 for c in joints)  # mm, the limit
    walls = [c for c in data["checks"] if c["name"].startswith("wall around")]
    assert walls and all(c["measured"] >= 1.2 for c in walls)  # the demo's min_wall


def test_demo_model_masses_are_density_times_volume(demo_model: Path) -> None:
    # PLA about 1.24 g/cm^3 (common practice, from memory); mass = density x volume
    with open(demo_model / "parts.csv", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) > 20
    for row in rows:
        assert float(row["mass (g)"]) == pytest.approx(
            1.24 * float(row["volume (cm^3)"]), rel=2e-3, abs=0.06
        )
        assert "face" in row["print with"]


def test_demo_model_volumes_scale_by_the_cube(demo_model: Path, demo_build) -> None:
    # geometric similarity: volumes scale by k^3; the wing half's pieces hold the full-size
    # wing half (with the model's thicker trailing edge) less its holes, so within 2 %
    pieces = [
        trimesh.load_mesh(str(p), file_type="stl").volume
        for p in (demo_model / "stl").glob("wing-right-*.stl")
    ]
    full = next(p for p in demo_build.build.parts if p.name == "wing-right")
    from geomgen.solids import kernel

    assert sum(pieces) == pytest.approx(kernel.volume(full.shape) * 1e-3, rel=0.02)
    report = (demo_model / "model-report.md").read_text(encoding="utf-8")
    assert "Scale 1:10" in report and "Reynolds" in report and "CAUTION" in report


# --- a small wing: fast, and a failing check names its piece ------------------------------------


def small_wing(tmp_path: Path, **model) -> Path:
    doc = trapezoid_document(area="0.6 m^2", aspect_ratio=7.0, taper_ratio=0.6)
    doc["name"] = "small"
    for key in ("horizontal_tail", "vertical_tail", "tail_cone"):
        doc.pop(key, None)
    doc["wing"]["controls"] = {
        "aileron": {
            "span_start": 0.5,
            "span_end": 0.9,
            "hinge": "constant_fraction",
            "hinge_at": 0.72,
        }
    }
    doc["model"] = {"scale": "1:4", "dowels": {"diameter": "2 mm", "length": "10 mm"}, **model}
    path = tmp_path / "small.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    return path


def test_small_wing_model_cuts_and_passes(tmp_path: Path) -> None:
    # span sqrt(7 x 0.6) = 2.05 m, 512 mm at 1:4: each half (256 mm) is cut in two pieces
    assert main(["model", str(small_wing(tmp_path)), "--out", str(tmp_path / "out")]) == 0
    folder = tmp_path / "out" / "small-model"
    names = sorted(p.stem for p in (folder / "stl").glob("*.stl"))
    assert "wing-right-1" in names and "wing-right-2" in names
    data = json.loads((folder / "checks.json").read_text(encoding="utf-8"))
    assert data["passed"]
    sting = [c for c in data["checks"] if c["name"] == "wall around sting hole"]
    assert sting, "without a fuselage the sting goes into the right wing root"


def test_a_failing_wall_check_names_the_piece(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # a hinge key bar as thick as the aileron: the wall check on the mesh (ray casting)
    # finds it breaking through the skin and names the pieces; nothing is written
    path = small_wing(tmp_path, hinge_key="6 mm")
    code = main(["model", str(path), "--out", str(tmp_path / "out")])
    err = capsys.readouterr().err
    assert code == 1, err
    assert "aileron-right-at0deg: wall around hinge key hole" in err, err
    assert not (tmp_path / "out" / "small-model").exists()
    failed = json.loads((tmp_path / "out" / "small-model.failed-checks.json").read_text())
    assert not failed["passed"]


# --- bad model input ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("model", "argv", "key"),
    [
        ({"scale": "1:10", "span": "1 m"}, [], "model.span"),
        ({"scale": "ten"}, [], "model.scale"),
        ({"deflections": {"aileron": ["40 deg"]}}, [], "model.deflections.aileron[0]"),
        ({"deflections": {"spoiler": ["1 deg"]}}, [], "model.deflections.spoiler"),
        ({"build_volume": ["220 mm", "220 mm"]}, [], "model.build_volume"),
        ({"tunnel": {"speed": "30 kg"}}, [], "model.tunnel.speed"),
        ({}, ["--scale", "1:0"], "--scale"),
        ({}, ["--span", "3 kg"], "--span"),
    ],
    ids=["scale-and-span", "scale-words", "deflection-too-big", "no-such-control",
         "build-volume-short", "speed-not-speed", "scale-zero", "span-not-length"],
)  # fmt: skip
def test_bad_model_input_is_refused_in_one_line(
    model: dict, argv: list[str], key: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    doc = demo_document()
    doc["model"] = model
    path = tmp_path / "bad.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    code = main(["model", str(path), *argv, "--out", str(tmp_path / "out")])
    lines = capsys.readouterr().err.splitlines()
    assert code == 2 and len(lines) == 1, lines
    assert f"{key}: " in lines[0], lines[0]
    assert not (tmp_path / "out").exists() or not any((tmp_path / "out").iterdir())


def test_no_scale_anywhere_is_refused(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    doc = demo_document()
    doc.pop("model")
    path = tmp_path / "no-model.yaml"
    path.write_text(yaml.safe_dump(doc, sort_keys=False), encoding="utf-8")
    assert main(["model", str(path), "--out", str(tmp_path / "out")]) == 2
    assert "model.scale" in capsys.readouterr().err
    _ = math.pi


def test_scaling_takes_volumes_by_the_cube_and_areas_by_the_square(demo_build) -> None:
    # geometric similarity: a solid scaled by k has k^3 its volume and k^2 its surface area,
    # exactly (up to the integration tolerance: model volumes are integrated to 1e-5)
    from geomgen.solids import kernel, printed

    fin = next(p for p in demo_build.build.parts if p.name == "fin").shape
    k = 1.0 / 12.0
    small = printed.scaled(fin, k, "fin")
    assert kernel.volume(small) == pytest.approx(kernel.volume(fin) * k**3, rel=1e-5)
    assert kernel.surface_area(small) == pytest.approx(kernel.surface_area(fin) * k**2, rel=1e-6)


def test_a_model_span_sets_the_scale() -> None:
    d = make_design(demo_document())
    layout = lay_out(size(d, (PROFILES,)), (PROFILES,))
    span = layout.sizing.wing.planform.span
    assert mdl.model_scale(layout, d.model, None, 0.9) == pytest.approx(0.9 / span, rel=1e-15)
    assert mdl.model_scale(layout, d.model, 0.05, None) == 0.05  # the command line wins
