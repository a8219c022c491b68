"""The work order's SVG drawings (issue 5): pin and polarity diagram, window cross-section to scale.

Independent references used here:
- Python's xml.etree parser: every drawing is well-formed XML (SVG 1.1 is an XML language);
- SVG 1.1, section 7 (coordinate systems): with width/height in mm and a viewBox of the same numbers,
  one user unit is one millimetre on paper, so "to scale" can be measured in user units;
- the dot convention (common practice, every circuits text): dotted terminals have the same
  instantaneous polarity; current into the dots gives aiding flux;
- the Design's own build numbers (layer centres, available height) as the geometry to reproduce.
No PDF is rendered here.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

import pytest

from specgen import api
from specgen.catalog.loader import load_catalog
from specgen.design.spec import load_spec
from specgen.documents import drawings as dr
from specgen.documents import workorder as wo
from specgen.documents.settings import DocumentSettings

SVG = "{http://www.w3.org/2000/svg}"
PARTS = ["BH-1042", "BH-2210", "BH-3305", "BH-4120", "BH-5018"]


@pytest.fixture(scope="module")
def built():
    cat = load_catalog(None)
    out = {}
    for path in api.demo_specs():
        spec = load_spec(path)
        d = api.run_design(spec, cat)
        out[spec.part] = (d, wo._drawings(d, DocumentSettings.from_shop(cat.shop)), cat)
    return out


def _parse(svg) -> ET.Element:
    root = ET.fromstring(str(svg))
    assert root.tag == f"{SVG}svg"
    return root


def _mm(root) -> tuple[float, float]:
    w, h = root.get("width"), root.get("height")
    assert w.endswith("mm") and h.endswith("mm")
    vb = [float(x) for x in root.get("viewBox").split()]
    assert vb[0] == 0 and vb[1] == 0
    assert vb[2] == pytest.approx(float(w[:-2])) and vb[3] == pytest.approx(float(h[:-2]))
    return vb[2], vb[3]


@pytest.mark.parametrize("part", PARTS)
def test_pin_diagram_has_one_dot_per_winding_at_its_dot_pin(built, part):
    d, draw, _cat = built[part]
    root = _parse(draw["pin_svg"])
    _mm(root)
    dots = root.findall(f".//{SVG}circle[@class='polarity-dot']")
    assert sorted(c.get("data-winding") for c in dots) == sorted(w.name for w in d.windings)
    labels = {t.text: t for t in root.findall(f".//{SVG}text") if t.get("class") == "pin-label"}
    for c in dots:
        w = d.winding(c.get("data-winding"))
        assert c.get("data-pin") == w.dot_pin
        # the dot sits nearer its own pin than the winding's other terminal
        other = w.finish if w.dot_pin == w.start else w.start
        x = float(c.get("cx"))
        near = abs(x - float(labels[w.dot_pin].get("x")))
        far = abs(x - float(labels[other].get("x")))
        assert near < far
    for w in d.windings:
        for s in w.sections:
            assert s.start_pin in labels and s.finish_pin in labels


def test_legend_states_the_dot_convention(built):
    """Common practice: same instantaneous polarity; current into the dots gives aiding flux."""
    root = _parse(built["BH-1042"][1]["pin_svg"])
    legend = " ".join(t.text for t in root.findall(f".//{SVG}text") if t.get("class") == "legend")
    assert "same instantaneous polarity" in legend
    assert "current into the dots gives aiding flux" in legend


@pytest.mark.parametrize("part", ["BH-1042", "BH-2210", "BH-3305"])
def test_bobbin_cross_section_is_to_scale(built, part):
    d, draw, cat = built[part]
    root = _parse(draw["window_svg"])
    _mm(root)
    scale_text = draw["window_scale"]
    a, b = (float(x) for x in scale_text.split(":"))
    scale = a / b
    # the available build line lies available x scale above the tube surface (the tube rect's top)
    tube = [r for r in root.findall(f".//{SVG}rect") if r.get("height") == "3"][0]
    base = float(tube.get("y"))
    avail = root.find(f".//{SVG}line[@class='available']")
    assert base - float(avail.get("y1")) == pytest.approx(d.build.available_m * 1e3 * scale, abs=0.02)
    # one drawn layer per layer of every section; circles: turns x strands, diameter to scale
    groups = root.findall(".//*[@class='layer']")
    expected_layers = sum(len(s.layers) for w in d.windings for s in w.sections)
    assert len(groups) == expected_layers
    by_label = {}
    for g in groups:
        by_label.setdefault(g.get("data-section"), []).append(g)
    for w in d.windings:
        for s in w.sections:
            drawn = by_label[wo.section_label(w, s)]
            assert [int(g.get("data-turns")) for g in drawn] == [l.turns for l in s.layers]
            for g, layer in zip(drawn, s.layers):
                circles = g.findall(f"{SVG}circle")
                if circles:
                    assert len(circles) == layer.turns * w.strands
                    r = float(circles[0].get("r")) / 0.92
                    assert 2 * r == pytest.approx(w.overall_diameter_m * 1e3 * scale, abs=0.02)
                    # the layer's centre line at its build height, to scale
                    cy = float(circles[0].get("cy"))
                    assert base - cy == pytest.approx(layer.build_to_centre_m * 1e3 * scale, abs=0.02)


@pytest.mark.parametrize("part", ["BH-4120", "BH-5018"])
def test_toroid_sector_marks_the_smallest_hole_to_scale(built, part):
    d, draw, cat = built[part]
    root = _parse(draw["window_svg"])
    a, b = (float(x) for x in draw["window_scale"].split(":"))
    scale = a / b
    core = cat.cores[d.core.id]
    r_face = core.dims["id"] / 2 - core.coating_m
    avail = root.find(f".//{SVG}path[@class='available']")
    radius = float(re.search(r"A([\d.]+) ", avail.get("d")).group(1))
    assert radius == pytest.approx((r_face - d.build.available_m) * 1e3 * scale, abs=0.02)
    layers = root.findall(".//*[@class='layer']")
    assert len(layers) == sum(len(s.layers) for w in d.windings for s in w.sections)


def test_text_in_drawings_is_escaped():
    coils = [dr.Coil(winding="<b>&W", label="<b>&W", start="1", finish="2", turns=5)]
    svg = dr.pin_diagram(["1", "2"], 1, coils, {"<b>&W": "1"})
    root = _parse(svg)
    texts = [t.text for t in root.findall(f".//{SVG}text")]
    assert "<b>&W" in texts
    assert "<b>" not in str(svg)


def test_scale_is_the_largest_that_fits():
    for w, h in [(44.1, 14.1), (25.7, 7.1), (120.0, 10.0), (3.0, 2.0), (400.0, 50.0)]:
        s = dr.choose_scale(w, h, 112.0, 95.0)
        bigger = [x for x in dr.SCALES if x > s]
        if s != dr.SCALES[-1]:          # the smallest scale is the fallback when nothing fits
            assert w * s <= 112.0 + 1e-9 and h * s <= 95.0 + 1e-9
        assert all(w * x > 112.0 or h * x > 95.0 for x in bigger)
    assert dr.scale_text(2.5) == "2.5:1" and dr.scale_text(0.5) == "1:2"


def _label_y(root) -> dict:
    """y of each section label by its build order (the text starts 'N. ')."""
    out = {}
    for t in root.iter(f"{SVG}text"):
        if t.get("class") == "section-label":
            out[int("".join(t.itertext()).split(".")[0])] = float(t.get("y"))
    return out


@pytest.mark.parametrize("part", ["BH-2210", "BH-4120"])
def test_section_labels_follow_the_build(built, part):
    """Labels stand in the order the sections lie in the drawing: in a bobbin window the first section
    is at the tube (bottom), so its label is lowest; in a toroid sector the first section lies against
    the core (top), so its label is highest. Each label is at least one label height from the next."""
    d, draw, cat = built[part]
    y = _label_y(_parse(draw["window_svg"]))
    order = [y[k] for k in sorted(y)]
    assert len(order) == sum(len(w.sections) for w in d.windings)
    steps = [b - a for a, b in zip(order, order[1:])]
    if d.core.shape == "toroid":
        assert all(s >= 7.99 for s in steps), order         # first section on top, then downwards
    else:
        assert all(s <= -7.99 for s in steps), order        # first section at the bottom, then upwards
