"""Layout format v1 (DESIGN.md section 2): every invalid input is refused with one
message naming the part and the problem; valid layouts survive a round trip exactly.

The rules checked here are the format's own (DESIGN.md section 2); where a check
states a fact from outside the project it names its source.
"""

from __future__ import annotations

import copy
import json
import math
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from solver.layout import (
    MAX_FILE_BYTES,
    Boundary,
    Circle,
    Ellipse,
    FixedLimit,
    Layout,
    LayoutError,
    Part,
    PeekLimit,
    Polygon,
    Rect,
    dumps_layout,
    layout_to_json,
    load_layout,
    loads_layout,
    parse_layout,
)
from solver.layout import Path as PathShape

BASE: dict[str, Any] = {
    "stresslens_layout": 1,
    "title": "two rods",
    "symmetry": "planar",
    "boundary": {"type": "open"},
    "limit": {"type": "fixed", "kV_per_mm": 3.0},
    "resolution": "normal",
    "parts": [
        {"name": "Rod", "kind": "electrode", "volts": 1000,
         "shape": {"type": "circle", "center": [0, 0], "radius": 1}},
        {"name": "Return", "kind": "electrode", "volts": 0,
         "shape": {"type": "circle", "center": [5, 0], "radius": 1}},
    ],
}


def edited(edit: Callable[[dict[str, Any]], object]) -> dict[str, Any]:
    """A deep copy of BASE changed by ``edit``."""
    d = copy.deepcopy(BASE)
    edit(d)
    return d


def rod(d: dict[str, Any]) -> dict[str, Any]:
    return d["parts"][0]


def slab(name: str, x0: float, x1: float, eps: float = 4.0) -> dict[str, Any]:
    return {"name": name, "kind": "dielectric", "permittivity": eps,
            "shape": {"type": "rect", "min": [x0, -3], "max": [x1, 3]}}


def square(side: float = 2.0, **extra: Any) -> dict[str, Any]:
    h = side / 2
    return {"type": "polygon", "points": [[-h, -h], [h, -h], [h, h], [-h, h]], **extra}


# (id, edited layout object, words the message must contain)
INVALID_OBJECTS: list[tuple[str, dict[str, Any], tuple[str, ...]]] = [
    ("unknown top-level key", edited(lambda d: d.update(colour="red")),
     ("layout", "unknown key 'colour'")),
    ("unknown part key", edited(lambda d: rod(d).update(colour="red")),
     ("part 'Rod'", "unknown key 'colour'")),
    ("unknown shape key", edited(lambda d: rod(d)["shape"].update(diameter=2)),
     ("part 'Rod' shape", "unknown key 'diameter'")),
    ("electrode with a charge", edited(lambda d: rod(d).update(charge=1e-9)),
     ("part 'Rod'", "unknown key 'charge'")),
    ("volts as text", edited(lambda d: rod(d).update(volts="1 kV")),
     ("part 'Rod'", "'volts' must be a number", "text")),
    ("radius as boolean", edited(lambda d: rod(d)["shape"].update(radius=True)),
     ("part 'Rod' shape", "'radius' must be a number")),
    ("name as number", edited(lambda d: rod(d).update(name=7)),
     ("part 1", "'name' must be text")),
    ("blank name", edited(lambda d: rod(d).update(name="   ")),
     ("part 1", "non-empty 'name'")),
    ("name with a line break", edited(lambda d: rod(d).update(name="Rod\nleft")),
     ("control character",)),
    ("name with a tab", edited(lambda d: rod(d).update(name="Rod\tleft")),
     ("control character",)),
    ("part not an object", edited(lambda d: d["parts"].append([1, 2])),
     ("part 3", "expected an object")),
    ("parts not a list", edited(lambda d: d.update(parts={"Rod": 1})),
     ("'parts' must be a list",)),
    ("title as number", edited(lambda d: d.update(title=3)), ("'title' must be text",)),
    ("point with three numbers", edited(lambda d: rod(d)["shape"].update(center=[0, 0, 0])),
     ("part 'Rod' shape", "'center'", "pair [x, y]")),
    ("unknown kind", edited(lambda d: rod(d).update(kind="anode")),
     ("part 'Rod'", "'kind' must be one of", "anode")),
    ("unknown shape type", edited(lambda d: rod(d)["shape"].update(type="star")),
     ("part 'Rod' shape", "'type' must be one of", "star")),
    ("unknown symmetry", edited(lambda d: d.update(symmetry="spherical")),
     ("'symmetry' must be one of", "spherical")),
    ("missing volts", edited(lambda d: rod(d).pop("volts")),
     ("part 'Rod'", "needs 'volts'")),
    ("missing shape", edited(lambda d: rod(d).pop("shape")), ("part 'Rod'", "needs a 'shape'")),
    ("missing radius", edited(lambda d: rod(d)["shape"].pop("radius")),
     ("part 'Rod' shape", "needs 'radius'")),
    ("missing kind", edited(lambda d: rod(d).pop("kind")), ("part 'Rod'", "needs 'kind'")),
    ("missing parts", edited(lambda d: d.pop("parts")), ("'parts' is missing",)),
    ("missing version key", edited(lambda d: d.pop("stresslens_layout")),
     ("not a Stresslens layout", "stresslens_layout")),
    ("dielectric without permittivity",
     edited(lambda d: d["parts"].append({"name": "Board", "kind": "dielectric",
                                         "shape": {"type": "circle", "center": [20, 0],
                                                   "radius": 1}})),
     ("part 'Board'", "needs 'permittivity'")),
    ("newer version", edited(lambda d: d.update(stresslens_layout=2)),
     ("version 2 is newer", "update")),
    ("absurdly new version", edited(lambda d: d.update(stresslens_layout=10**400)),
     ("newer than this program",)),
    ("version zero", edited(lambda d: d.update(stresslens_layout=0)), ("version 0",)),
    ("version as float", edited(lambda d: d.update(stresslens_layout=1.0)),
     ("'stresslens_layout' must be a whole number",)),
    ("number too large for a float", edited(lambda d: rod(d).update(volts=10**400)),
     ("part 'Rod'", "'volts'", "out of range")),
    ("self-intersecting polygon",
     edited(lambda d: rod(d).update(shape={"type": "polygon",
                                           "points": [[0, 0], [2, 2], [2, 0], [0, 2]]})),
     ("part 'Rod'", "crosses itself", "near (1, 1) mm")),
    ("polygon with all points on a line",
     edited(lambda d: rod(d).update(shape={"type": "polygon",
                                           "points": [[-2, 0], [-1, 0], [0, 0]]})),
     ("part 'Rod'",)),
    ("polygon with two points",
     edited(lambda d: rod(d).update(shape={"type": "polygon", "points": [[0, 0], [1, 0]]})),
     ("part 'Rod' shape", "at least 3 points")),
    ("hole outside its polygon",
     edited(lambda d: rod(d).update(shape=square(2, holes=[[[5, 5], [6, 5], [6, 6]]]))),
     ("part 'Rod'", "hole lies outside")),
    ("path with no length",
     edited(lambda d: rod(d).update(shape={"type": "path", "points": [[0, 0], [0, 0]],
                                           "width": 1})),
     ("part 'Rod' shape", "no length")),
    ("different conductors overlapping",
     edited(lambda d: d["parts"][1]["shape"].update(center=[1.5, 0])),
     ("parts 'Rod' and 'Return'", "touch or overlap", "same voltage")),
    ("different conductors touching (circles tangent at x = 1 mm)",
     edited(lambda d: d["parts"][1]["shape"].update(center=[2, 0])),
     ("parts 'Rod' and 'Return'", "touch or overlap", "near (1, 0) mm")),
    ("floating part touching an electrode",
     edited(lambda d: d["parts"].__setitem__(1, {
         "name": "Shield", "kind": "floating", "charge": 0,
         "shape": {"type": "rect", "min": [1, -1], "max": [3, 1]}})),
     ("parts 'Rod' and 'Shield'", "touch or overlap")),
    ("conductor partly inside a dielectric",
     edited(lambda d: d["parts"].append(slab("Board", 0, 3))),
     ("part 'Rod'", "partly inside dielectric 'Board'")),
    ("dielectric inside a conductor",
     edited(lambda d: d["parts"].append({"name": "Bead", "kind": "dielectric", "permittivity": 3,
                                         "shape": {"type": "circle", "center": [0, 0],
                                                   "radius": 0.3}})),
     ("part 'Bead'", "inside conductor 'Rod'")),
    ("two dielectrics overlapping partly",
     edited(lambda d: d["parts"].extend([slab("Board", 10, 13), slab("Coat", 12, 15)])),
     ("parts 'Board' and 'Coat'", "overlap partly")),
    ("permittivity below 1", edited(lambda d: d["parts"].append(slab("Board", 10, 13, 0.5))),
     ("part 'Board'", "'permittivity' must lie between 1")),
    ("axisymmetric part at r < 0",
     edited(lambda d: (d.update(symmetry="axisymmetric"),
                       rod(d)["shape"].update(center=[0.5, 0]))),
     ("part 'Rod'", "r = -0.5 mm", "radius")),
    ("axisymmetric box starting at r < 0",
     edited(lambda d: d.update(symmetry="axisymmetric",
                               boundary={"type": "box", "min": [-5, -5], "max": [20, 20],
                                         "volts": 0})),
     ("boundary", "starts at the axis", "-5 mm")),
    ("axisymmetric box starting off the axis",
     edited(lambda d: d.update(symmetry="axisymmetric",
                               boundary={"type": "box", "min": [1, -5], "max": [20, 20],
                                         "volts": 0})),
     ("boundary", "'min' r must be 0")),
    ("part outside the boundary box",
     edited(lambda d: d.update(boundary={"type": "box", "min": [-2, -2], "max": [2, 2],
                                         "volts": 0})),
     ("part 'Return'", "outside the boundary box")),
    ("box without volts",
     edited(lambda d: d.update(boundary={"type": "box", "min": [-9, -9], "max": [9, 9]})),
     ("boundary", "needs 'volts'")),
    ("box with max below min",
     edited(lambda d: d.update(boundary={"type": "box", "min": [9, 9], "max": [-9, -9],
                                         "volts": 0})),
     ("boundary", "'max' must be above and right of 'min'")),
    ("rect corner radius above half the side",
     edited(lambda d: rod(d).update(shape={"type": "rect", "min": [-1, -1], "max": [1, 1],
                                           "corner_radius": 1.5})),
     ("part 'Rod' shape", "'corner_radius'", "half the shorter side")),
    ("negative corner radius",
     edited(lambda d: rod(d).update(shape={"type": "rect", "min": [-1, -1], "max": [1, 1],
                                           "corner_radius": -0.1})),
     ("part 'Rod' shape", "'corner_radius'")),
    ("polygon corner radius too large for its edges",
     edited(lambda d: rod(d).update(shape=square(2, corner_radius=1.2))),
     ("part 'Rod'", "corner radius at vertex", "too large")),
    ("per-vertex corner radii of the wrong count",
     edited(lambda d: rod(d).update(shape=square(2, corner_radius=[0.1, 0.1]))),
     ("part 'Rod' shape", "2 values for 4 vertices")),
    ("corner radius as text",
     edited(lambda d: rod(d).update(shape=square(2, corner_radius="round"))),
     ("part 'Rod' shape", "'corner_radius' must be a number")),
    ("duplicate names", edited(lambda d: d["parts"][1].update(name="Rod")),
     ("part 'Rod'", "more than one part")),
    ("zero radius", edited(lambda d: rod(d)["shape"].update(radius=0)),
     ("part 'Rod' shape", "'radius' must be positive")),
    ("radius below the smallest length", edited(lambda d: rod(d)["shape"].update(radius=1e-12)),
     ("part 'Rod' shape", "'radius'", "smallest length")),
    ("radius beyond any layout", edited(lambda d: rod(d)["shape"].update(radius=1e200)),
     ("part 'Rod' shape", "'radius'", "larger than")),
    ("coordinate far away", edited(lambda d: rod(d)["shape"].update(center=[1e9, 0])),
     ("part 'Rod' shape", "'center'", "from the origin")),
    ("ellipse with a zero radius",
     edited(lambda d: rod(d).update(shape={"type": "ellipse", "center": [0, 0],
                                           "radii": [1, 0]})),
     ("part 'Rod' shape", "'radii' must be positive")),
    ("negative field limit", edited(lambda d: d.update(limit={"type": "fixed", "kV_per_mm": -3})),
     ("limit", "'kV_per_mm' must be positive")),
    ("Peek limit at zero pressure",
     edited(lambda d: d.update(limit={"type": "peek", "pressure_kPa": 0})),
     ("limit", "'pressure_kPa'")),
    ("Peek surface factor above 1",
     edited(lambda d: d.update(limit={"type": "peek", "surface_factor": 1.5})),
     ("limit", "'surface_factor'")),
    ("unknown resolution name", edited(lambda d: d.update(resolution="ultra")),
     ("'resolution'", "ultra")),
    ("zero resolution", edited(lambda d: d.update(resolution=0)), ("'resolution'",)),
    ("absurdly fine resolution", edited(lambda d: d.update(resolution=1e-300)),
     ("'resolution'", "between")),
    ("no conductor at all",
     edited(lambda d: d.update(parts=[slab("Board", 0, 3)])), ("no conductor",)),
    ("top level not an object", {"stresslens_layout": 1, "parts": [[]]}, ("part 1",)),
]


@pytest.mark.parametrize("obj, words", [(o, w) for _, o, w in INVALID_OBJECTS],
                         ids=[i for i, _, _ in INVALID_OBJECTS])
def test_invalid_layout_is_refused_with_a_message_naming_it(obj: dict[str, Any],
                                                             words: tuple[str, ...]) -> None:
    # the rules: DESIGN.md section 2 (our own format)
    with pytest.raises(LayoutError) as info:
        parse_layout(obj)
    message = str(info.value)
    for word in words:
        assert word in message, f"{word!r} not in {message!r}"
    # the same refusal arrives through the text reader
    with pytest.raises(LayoutError, match=".+"):
        loads_layout(json.dumps(obj))


RAW_TEXT_CASES: list[tuple[str, bytes, tuple[str, ...]]] = [
    ("NaN volts", json.dumps(BASE).replace("1000", "NaN").encode(),
     ("part 'Rod'", "'volts' must be a finite number")),
    ("Infinity radius", json.dumps(BASE).replace('"radius": 1}', '"radius": Infinity}', 1).encode(),
     ("part 'Rod' shape", "'radius' must be a finite number")),
    ("-Infinity coordinate", json.dumps(BASE).replace("[5, 0]", "[-Infinity, 0]").encode(),
     ("part 'Return' shape", "'center'", "finite")),
    ("1e400 overflows to infinity", json.dumps(BASE).replace("1000", "1e400").encode(),
     ("part 'Rod'", "finite")),
    ("integer of 5000 digits", json.dumps(BASE).replace("1000", "1" + "0" * 5000).encode(),
     ("not valid JSON", "digits")),
    ("not UTF-8", b'{"stresslens_layout": 1, "title": "\xff\xfe"}', ("not UTF-8", "byte")),
    ("not JSON", b"Rod at 1 kV, Return at 0 V", ("not valid JSON", "line 1")),
    ("truncated JSON", json.dumps(BASE).encode()[:-20], ("not valid JSON",)),
    ("empty file", b"", ("not valid JSON",)),
    ("deeply nested lists", b"[" * 100_000 + b"]" * 100_000, ("nested too deeply",)),
    ("deeply nested objects", b'{"a":' * 100_000 + b"1" + b"}" * 100_000,
     ("nested too deeply",)),
    ("a JSON list at top level", b"[]", ("expected an object", "a list")),
    ("a JSON string at top level", b'"layout"', ("expected an object", "text")),
    ("a key given twice", json.dumps(BASE).replace('"volts": 1000,', '"volts": 0, "volts": 1000,')
     .encode(), ("part 'Rod'", "'volts' is given more than once")),
    ("a top-level key given twice", b'{"stresslens_layout": 1, "stresslens_layout": 1}',
     ("layout", "'stresslens_layout' is given more than once")),
]


@pytest.mark.parametrize("raw, words", [(r, w) for _, r, w in RAW_TEXT_CASES],
                         ids=[i for i, _, _ in RAW_TEXT_CASES])
def test_invalid_text_is_refused_with_a_message(raw: bytes, words: tuple[str, ...]) -> None:
    # the rules: DESIGN.md section 2 (UTF-8 JSON, finite numbers)
    with pytest.raises(LayoutError) as info:
        loads_layout(raw)
    for word in words:
        assert word in str(info.value), f"{word!r} not in {str(info.value)!r}"


def test_utf8_with_byte_order_mark_is_read() -> None:
    # common practice, no source: editors on some platforms write a BOM
    layout = loads_layout(b"\xef\xbb\xbf" + json.dumps(BASE).encode())
    assert [p.name for p in layout.parts] == ["Rod", "Return"]


def test_missing_file_names_the_path(tmp_path: Path) -> None:
    with pytest.raises(LayoutError, match="cannot open .*nowhere.layout.json"):
        load_layout(tmp_path / "nowhere.layout.json")


def test_directory_instead_of_file_is_refused(tmp_path: Path) -> None:
    with pytest.raises(LayoutError, match="cannot read"):
        load_layout(tmp_path)


def test_oversized_file_is_refused_before_reading(tmp_path: Path) -> None:
    big = tmp_path / "big.layout.json"
    with open(big, "wb") as f:
        f.truncate(MAX_FILE_BYTES + 1)  # sparse: nothing is written or read
    with pytest.raises(LayoutError, match="larger than"):
        load_layout(big)


def test_refused_file_is_left_untouched(tmp_path: Path) -> None:
    # bad input never costs the user their work: the loader only reads
    path = tmp_path / "broken.layout.json"
    text = json.dumps(edited(lambda d: d["parts"][1]["shape"].update(center=[1.5, 0])))
    path.write_text(text, encoding="utf-8")
    with pytest.raises(LayoutError):
        load_layout(path)
    assert path.read_text(encoding="utf-8") == text


def test_names_may_hold_any_printed_text() -> None:
    # non-breaking spaces, accents, symbols and joined emoji are all fine in a name
    obj = edited(lambda d: rod(d).update(name="Stab\u00a0Ø 10 mm – Ω ✓ 👩\u200d🔬"))
    assert parse_layout(obj).parts[0].name.startswith("Stab")


def test_same_voltage_electrodes_may_overlap() -> None:
    # DESIGN.md section 2: only parts of *different* conductors may not touch
    obj = edited(lambda d: (d["parts"][1].update(volts=1000),
                            d["parts"][1]["shape"].update(center=[1.5, 0])))
    assert len(parse_layout(obj).parts) == 2


def test_conductor_wholly_inside_a_dielectric_is_accepted() -> None:
    obj = edited(lambda d: d["parts"].append(slab("Sleeve", -2, 7)))
    assert parse_layout(obj).part("Sleeve").permittivity == 4.0


def test_conductor_resting_on_a_dielectric_face_is_accepted() -> None:
    # a trace on a circuit board touches the board along an edge
    obj = edited(lambda d: d["parts"].append(slab("Board", 1, 3)))
    assert parse_layout(obj).part("Board").kind == "dielectric"


def test_closing_point_repeated_is_dropped() -> None:
    obj = edited(lambda d: rod(d).update(shape={"type": "polygon", "points": [
        [-1, -1], [1, -1], [1, 1], [-1, 1], [-1, -1]]}))
    shape = parse_layout(obj).part("Rod").shape
    assert isinstance(shape, Polygon) and len(shape.points) == 4


def test_defaults_of_optional_keys() -> None:
    obj = {"stresslens_layout": 1, "parts": [BASE["parts"][0]]}
    layout = parse_layout(obj)
    assert layout.symmetry == "planar" and layout.boundary == Boundary()
    assert layout.limit == FixedLimit(3.0) and layout.resolution == "normal"
    assert layout.title == ""


def _every_kind_of_layout() -> list[Layout]:
    parts = (
        Part("Round", "electrode", Circle((0.0, 0.0), 2.0), volts=12_000.0),
        Part("Oval", "electrode", Ellipse((30.0, 0.0), (4.0, 1.5), 25.0), volts=-3000.0),
        Part("Block", "electrode", Rect((-20.0, 20.0), (-5.0, 30.0), 1.25), volts=0.0),
        Part("Plate", "floating", Polygon(
            ((10.0, 20.0), (25.0, 20.0), (25.0, 26.0), (10.0, 26.0)),
            holes=(((12.0, 22.0), (14.0, 22.0), (14.0, 24.0)),),
            corner_radius=(0.5, 0.0, 0.5, 1.0)), charge=2.5e-9),
        Part("Trace", "electrode", PathShape(((-30.0, -20.0), (-10.0, -20.0), (-10.0, -10.0)),
                                             0.8), volts=500.0),
        Part("Board", "dielectric", Polygon(((40.0, -30.0), (60.0, -30.0), (60.0, -25.0),
                                             (40.0, -25.0)), corner_radius=0.3),
             permittivity=4.4),
    )
    return [
        Layout(parts=parts, title="every shape", symmetry="planar"),
        Layout(parts=parts[:1] + parts[5:], title="Grösse µm ✓", symmetry="planar",
               boundary=Boundary("box", (-50.0, -50.0), (80.0, 60.0), None),
               limit=PeekLimit(90.0, 35.0, 0.8), resolution=0.05),
        Layout(parts=(Part("Tip", "electrode", Circle((5.0, 10.0), 2.0), volts=1.0),),
               symmetry="axisymmetric",
               boundary=Boundary("box", (0.0, -5.0), (40.0, 40.0), 0.0), resolution="fine"),
    ]


@pytest.mark.parametrize("layout", _every_kind_of_layout(), ids=["planar", "box", "axisym"])
def test_round_trip_is_exact(layout: Layout) -> None:
    # common practice, no source: writing then reading must give back the same value
    assert parse_layout(layout_to_json(layout)) == layout
    assert loads_layout(dumps_layout(layout)) == layout
    assert loads_layout(dumps_layout(layout).encode("utf-8")) == layout


def test_written_layout_is_plain_json_text() -> None:
    text = dumps_layout(_every_kind_of_layout()[0])
    assert text.endswith("\n")
    obj = json.loads(text)
    assert obj["stresslens_layout"] == 1 and len(obj["parts"]) == 6


def test_vertex_count_is_capped() -> None:
    from solver.layout import MAX_VERTICES

    n = MAX_VERTICES + 1
    ring = [[math.cos(2 * math.pi * k / n), math.sin(2 * math.pi * k / n)] for k in range(n)]
    obj = edited(lambda d: rod(d).update(shape={"type": "polygon", "points": ring}))
    with pytest.raises(LayoutError, match=f"part 'Rod' shape 'points' has {n} points; at most"):
        parse_layout(obj)


def test_part_count_is_capped() -> None:
    from solver.layout import MAX_PARTS

    many = [{"name": f"Wire {k}", "kind": "electrode", "volts": 0,
             "shape": {"type": "circle", "center": [3.0 * k, 0], "radius": 1}}
            for k in range(MAX_PARTS + 1)]
    with pytest.raises(LayoutError, match=f"layout has {MAX_PARTS + 1} parts; at most"):
        parse_layout(edited(lambda d: d.update(parts=many)))
