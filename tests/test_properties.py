"""Property-based tests: random valid designs within the documented ranges.

Every design is drawn from the demo (``designs.trapezoid_document`` for a straight-tapered
wing, ``designs.bodyless_document`` for the demo's cranked wing with its panels redrawn). For
each, sizing and layout either succeed with the invariants below, or fail with a clean
InputError naming a key (or a GeometryError naming a part), never another exception:

- the reference area is 2 x the integral of the chord over the semi-span (the fin's: 1 x over
  its height), integrated here from the planform's stations (chords are linear between them,
  so the trapezoid rule is exact) and compared with the area the design asks for;
- the tail volume coefficients V_H = S_H l_H / (S c_MGC) and V_V = S_V l_V / (S b) (Raymer,
  Aircraft Design: A Conceptual Approach, ch. 6), with the MGC c = (2/S) int c^2 dy and the
  tail arms as the x distance between MGC quarter-chord points, integrated here as well;
- aspect ratio b^2 / S, and the minimum-wetted-area arm where a tail asks for it;
- the left half's corner points and hinge points mirror the right half's (y -> -y).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from designs import TAIL_CONE, bodyless_document, trapezoid_document
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from geomgen import design
from geomgen.design.units import parse_quantity
from geomgen.errors import GeometryError, InputError
from geomgen.geometry.layout import Layout, lay_out
from geomgen.sizing.aircraft import Sizing, size

FAST = settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _deg(x: float) -> str:
    return f"{x:.6g} deg"


@st.composite
def tail_arm(draw: st.DrawFn, low: float, high: float) -> str:
    if draw(st.booleans()):
        return "optimum"
    return f"{draw(st.floats(low, high)):.6g} m"


@st.composite
def designs(draw: st.DrawFn) -> dict:
    """A design document within the documented ranges (not every one is consistent: a short
    tail arm or a hinge that leaves the chord must be refused cleanly)."""
    cranked = draw(st.booleans())
    if cranked:
        doc = bodyless_document()
        doc.pop("model", None)
        inner = draw(st.floats(0.15, 0.7))
        doc["wing"]["panels"] = [
            {"span_fraction": inner, "chord_ratio": draw(st.floats(0.7, 1.1))},
            {
                "span_fraction": 1.0,
                "chord_ratio": draw(st.floats(0.25, 0.9)),
                "sweep": _deg(draw(st.floats(-5, 25))),
            },
        ]
        doc["wing"]["area"] = f"{draw(st.floats(4, 30)):.6g} m^2"
        doc["wing"]["aspect_ratio"] = draw(st.floats(4, 14))
        # controls on a cranked wing end at the break or stay outboard of it (a hinge may
        # not kink): flap inboard of the break, aileron outboard
        doc["wing"]["controls"]["flap"].update(span_start=0.05, span_end=inner)
        doc["wing"]["controls"]["aileron"].update(span_start=min(inner + 0.02, 0.9))
    else:
        doc = trapezoid_document(
            area=f"{draw(st.floats(2, 40)):.6g} m^2",
            aspect_ratio=draw(st.floats(3, 16)),
            taper_ratio=draw(st.floats(0.2, 1.0)),
            sweep=_deg(draw(st.floats(-10, 35))),
            sweep_at=draw(st.sampled_from([0.0, 0.25, 0.5, 1.0])),
        )
        start = draw(st.floats(0.4, 0.8))
        aileron = doc["wing"]["controls"]["aileron"]
        aileron.update(
            span_start=start,
            span_end=draw(st.floats(start + 0.08, 0.99)),
            hinge="constant_fraction",
            hinge_at=draw(st.floats(0.6, 0.85)),
        )
        flap = doc["wing"]["controls"]["flap"]
        flap.update(span_start=draw(st.floats(0.02, 0.2)), span_end=start - 0.02)
    wing = doc["wing"]
    wing.update(
        dihedral=_deg(draw(st.floats(-5, 8))),
        incidence=_deg(draw(st.floats(-3, 5))),
        twist=_deg(draw(st.floats(-6, 3))),
    )
    ht, vt = doc["horizontal_tail"], doc["vertical_tail"]
    ht.update(
        volume_coefficient=draw(st.floats(0.3, 1.1)),
        tail_arm=draw(tail_arm(2.0, 9.0)),
        aspect_ratio=draw(st.floats(3, 7)),
        taper_ratio=draw(st.floats(0.4, 1.0)),
        sweep=_deg(draw(st.floats(0, 20))),
    )
    elevator = ht["controls"]["elevator"]
    elevator.update(span_start=draw(st.floats(0.0, 0.2)), hinge_at=draw(st.floats(0.55, 0.75)))
    if draw(st.booleans()):  # else the demo's common straight hinge (it may leave the chord)
        elevator.update(hinge="constant_fraction", common_hinge=False)
    vt.update(
        volume_coefficient=draw(st.floats(0.02, 0.1)),
        tail_arm=draw(tail_arm(2.0, 9.0)),
        aspect_ratio=draw(st.floats(0.8, 2.5)),
        taper_ratio=draw(st.floats(0.3, 1.0)),
        sweep=_deg(draw(st.floats(0, 40))),
    )
    vt["controls"]["rudder"].update(
        span_start=draw(st.floats(0.0, 0.3)), hinge_at=draw(st.floats(0.5, 0.8))
    )
    return doc


def _sized(doc: dict) -> tuple[Sizing, Layout] | None:
    """Size and lay out; None after a clean refusal, which must name a key (or a part)."""
    try:
        d = design.from_mapping(doc, source="random.yaml")
        sizing = size(d)
        return sizing, lay_out(sizing)
    except InputError as err:
        assert err.path, f"an input error without a key path: {err}"
        assert "\n" not in str(err)
        return None
    except GeometryError as err:
        assert err.part, f"a geometry error without a part: {err}"
        return None


def _integrals(pf) -> tuple[float, float, float]:
    """(int c ds, int c^2 ds, int c (x_le + c/4) ds) over one side, exact for chords and
    leading edges linear between the stations (Simpson is exact for these quadratics)."""
    a1 = a2 = aq = 0.0
    for a, b in zip(pf.stations, pf.stations[1:], strict=False):
        h = b.s - a.s
        cm, xm = (a.chord + b.chord) / 2, (a.x_le + b.x_le) / 2
        a1 += h * (a.chord + b.chord) / 2
        a2 += h / 6 * (a.chord**2 + 4 * cm**2 + b.chord**2)
        q = [c * (x + c / 4) for c, x in ((a.chord, a.x_le), (cm, xm), (b.chord, b.x_le))]
        aq += h / 6 * (q[0] + 4 * q[1] + q[2])
    return a1, a2, aq


def _check_invariants(doc: dict, sizing: Sizing, layout: Layout) -> None:
    wing = sizing.wing.planform
    w1, w2, wq = _integrals(wing)
    area = 2 * w1
    asked = parse_quantity(doc["wing"]["area"], "area")
    assert area == pytest.approx(asked, rel=1e-12)
    assert wing.area == pytest.approx(asked, rel=1e-12)
    span = 2 * wing.stations[-1].s
    assert span**2 / area == pytest.approx(doc["wing"]["aspect_ratio"], rel=1e-12)
    mgc = 2 * w2 / area
    wing_qc = sizing.wing.apex_x + 2 * wq / area
    references = {"horizontal_tail": mgc, "vertical_tail": span}
    arms = {}
    for key in ("horizontal_tail", "vertical_tail"):
        tail = getattr(sizing, key)
        t1, _, tq = _integrals(tail.planform)
        tail_area = t1 * (2 if key == "horizontal_tail" else 1)
        arm = tail.apex_x + tq / t1 - wing_qc
        arms[key] = arm
        # Raymer ch. 6: V_H = S_H l_H / (S c_MGC); V_V = S_V l_V / (S b)
        volume = tail_area * arm / (area * references[key])
        assert volume == pytest.approx(doc[key]["volume_coefficient"], rel=1e-9)
        if doc[key]["tail_arm"] != "optimum":
            assert arm == pytest.approx(parse_quantity(doc[key]["tail_arm"], "length"), rel=1e-9)
        height = tail.planform.stations[-1].s * (2 if key == "horizontal_tail" else 1)
        assert height**2 / tail_area == pytest.approx(doc[key]["aspect_ratio"], rel=1e-12)
    optimum = [k for k in arms if doc[k]["tail_arm"] == "optimum"]
    if optimum:
        # minimum of the cone's pi (R1 + R2) l plus the tails' 2 S (V_H c + V_V b) / l
        r = sum(parse_quantity(v, "length") for v in TAIL_CONE.values())
        terms = sum(doc[k]["volume_coefficient"] * references[k] for k in optimum)
        best = math.sqrt(2 * area * terms / (math.pi * r))
        for k in optimum:
            assert arms[k] == pytest.approx(best, rel=1e-9)
    for sl in layout.surfaces:
        if not sl.sizing.planform.symmetric:
            continue
        right = [c for c in sl.corners if c.side == "right"]
        left = [c for c in sl.corners if c.side == "left"]
        assert len(right) == len(left) == len(sl.sizing.planform.stations) - 1
        for r_, l_ in zip(right, left, strict=True):
            for name in ("le_inner", "te_inner", "te_outer", "le_outer"):
                (xr, yr, zr), (xl, yl, zl) = getattr(r_, name), getattr(l_, name)
                assert (xl, yl, zl) == pytest.approx((xr, -yr, zr), abs=1e-12)
        for c in (c for c in sl.controls if c.side == "right"):
            other = next(o for o in sl.controls if o.kind == c.kind and o.side == "left")
            for hr, hl in zip(c.hinge, other.hinge, strict=True):
                x, y, z = hr.point
                assert hl.point == pytest.approx((x, -y, z), abs=1e-12)


@FAST
@given(doc=designs())
def test_random_designs_size_consistently_or_are_refused_cleanly(doc: dict) -> None:
    result = _sized(doc)
    if result is not None:
        _check_invariants(doc, *result)


def test_most_random_designs_are_accepted() -> None:
    """The strategy is not so wild that the invariants are rarely reached."""
    accepted = []

    @settings(max_examples=60, deadline=None, database=None, derandomize=True)
    @given(doc=designs())
    def count(doc: dict) -> None:
        accepted.append(_sized(doc) is not None)

    count()
    assert sum(accepted) >= 0.4 * len(accepted), f"{sum(accepted)} of {len(accepted)}"


@settings(max_examples=3, deadline=None, database=None)
@given(doc=designs(), surface=st.sampled_from(["stabilizer-right", "fin"]))
def test_random_tails_build_with_every_check_passing(doc: dict, surface: str) -> None:
    """A few random designs built (one tail each, to keep the suite quick): every check of
    the solids passes, or the build fails with a GeometryError naming the part."""
    result = _sized(doc)
    if result is None:
        return
    from geomgen.checks import solid_checks as checks
    from geomgen.solids import assembly

    _, layout = result
    try:
        built = assembly.build(layout, (), {surface})
    except GeometryError as err:
        assert err.part, str(err)
        return
    results = checks.surface_checks(built, ())
    assert results
    failed = [f"{c.part}: {c.name}" for c in results if not c.passed]
    assert not failed, failed


# --- odd YAML text: tags, keys, dates and big numbers are refused in one line, or taken ---------

ODD = settings(max_examples=60, deadline=None, database=None, derandomize=True)

_DEMO_TEXT = (Path(__file__).resolve().parent.parent / "examples" / "veyra-t2.yaml").read_text(
    encoding="utf-8"
)
_RATIO = "aspect_ratio: 7.8"
_DATE = 'date: "2026-12-01"'

#: tags that are never plain YAML, and plain tags whose value may or may not fit them
_FOREIGN_TAGS = ["!!set", "!!binary", "!!timestamp", "!!omap", "!!pairs", "!local", "!!python/int"]
_PLAIN_TAGS = ["!!float", "!!int", "!!bool", "!!null", "!!str"]


def _refused_cleanly(text: str, key: str | None) -> design.Design | None:
    """The design of ``text``, or None after a refusal: one line, naming ``key`` if given."""
    try:
        return design.loads(text, source="odd.yaml")
    except InputError as err:
        message = str(err)
        assert "\n" not in message
        assert message.startswith("odd.yaml: ")
        if key is not None:
            assert message.startswith(f"odd.yaml: {key}: "), message
        return None


@ODD
@given(
    tag=st.sampled_from(_FOREIGN_TAGS + _PLAIN_TAGS),
    value=st.one_of(
        st.sampled_from(["abc", "maybe", "7.8", "8", "0x1F", "1:30", "2026-02-30", "~", "''"]),
        st.floats(allow_nan=False).map(repr),
        st.text(alphabet="0123456789abcdefx.:_-+", min_size=1, max_size=12),
    ),
)
def test_tagged_values_are_refused_in_one_line_or_taken(tag: str, value: str) -> None:
    text = _DEMO_TEXT.replace(_RATIO, f"aspect_ratio: {tag} {value}", 1)
    d = _refused_cleanly(text, "wing.aspect_ratio")
    if tag in _FOREIGN_TAGS:
        assert d is None
    if d is not None:
        assert tag == "!!float" or tag == "!!int"
        assert d.wing.aspect_ratio == float(value)


@st.composite
def _odd_keys(draw: st.DrawFn) -> str:
    """A key that is a mapping, a list, a merge key or a tagged scalar, in flow or block."""
    inner = draw(st.sampled_from(["{a: 1}", "[1, 2]", "{}", "[]", "[[x]]", "{? [1] : 2}"]))
    return draw(
        st.sampled_from([f"? {inner}\n: 1", f"{inner}: 1", "<<: {cl_max: 1.7}", "!!set {a}: 1"])
    )


@ODD
@given(key=_odd_keys(), where=st.sampled_from(["", "requirements", "wing", "wing.apex"]))
def test_odd_keys_are_refused_in_one_line(key: str, where: str) -> None:
    if where == "":
        text, path = _DEMO_TEXT + key + "\n", None
    elif where == "wing.apex":
        flow = key.replace("\n", " ").replace("? ", "? ")
        text = _DEMO_TEXT.replace('apex: {x: "1.55 m",', "apex: {" + flow + ', x: "1.55 m",', 1)
        path = where
    else:
        indented = "\n".join(f"  {line}" for line in key.splitlines())
        text = _DEMO_TEXT.replace(f"\n{where}:\n", f"\n{where}:\n{indented}\n", 1)
        path = where
    assert _refused_cleanly(text, path) is None


@ODD
@given(
    year=st.integers(0, 9999),
    month=st.integers(0, 19),
    day=st.integers(0, 39),
    quoted=st.booleans(),
)
def test_dates_are_days_of_the_calendar_or_refused(
    year: int, month: int, day: int, quoted: bool
) -> None:
    import datetime

    written = f"{year:04d}-{month:02d}-{day:02d}"
    q = '"' if quoted else ""
    d = _refused_cleanly(_DEMO_TEXT.replace(_DATE, f"date: {q}{written}{q}", 1), "date")
    try:
        datetime.date(year, month, day)
        real = True
    except ValueError:
        real = False
    assert (d is not None) == real, written
    if d is not None:
        assert d.date == written


@ODD
@given(
    digits=st.integers(1, 6000),
    sign=st.sampled_from(["", "-", "+"]),
    suffix=st.sampled_from(["", ".0", ".5e3", "e-2", "e400"]),
)
def test_big_numbers_are_refused_in_one_line(digits: int, sign: str, suffix: str) -> None:
    written = sign + "9" * digits + suffix
    d = _refused_cleanly(
        _DEMO_TEXT.replace(_RATIO, f"aspect_ratio: {written}", 1), "wing.aspect_ratio"
    )
    if d is not None:
        assert 0.1 <= d.wing.aspect_ratio <= 40
        assert float(written) == d.wing.aspect_ratio
