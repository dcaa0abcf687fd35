"""Checks of a coilwright output folder with independent readers.

Run with the interop venv (.venv-interop/bin/python, see setup.sh):

    checks.py readers DIR      gerbonara + pygerber read every Gerber,
                               gerbonara every Excellon, no warning allowed
    checks.py geometry DIR     shapely on the parsed Gerbers/Excellon:
                               turn-to-turn gap, drill hits on copper
    checks.py symbol DIR       kiutils reads the KiCad symbol library and the
                               project library tables: two pins named as the
                               footprint's pads, the Footprint property
                               names the footprint, the tables' paths exist
    checks.py dxf DIR          ezdxf reads every DXF and audits it with no
                               error; per copper layer the track centre-line
                               length in the DXF equals gerbonara's reading
                               of the Gerber within 0.1 %; the outline DXF's
                               length equals the profile Gerber's
    checks.py raster DIR KDIR  gerbv renders our copper Gerbers and the ones
                               KiCad plotted from our board (in KDIR) in the
                               same frame; copper pixels must agree
    checks.py nets DIR MM      an array's copper, per layer, grouped by the
                               Gerber net attribute (gerbonara) and drawn
                               with shapely: copper of different nets at
                               least MM apart (1 um for arc flattening)
    checks.py tail DIR         a flex tail's fingers (gerbonara, shapely):
                               gaps = pitch - finger_width within 1 um,
                               coverlay opened over each finger, the
                               stiffener drawing covering them

DIR holds the bundle plus `expect.json` ({"design": ..., "layout": ...},
written by tests/suite/interop.rs). Each failure is printed as
"FAIL [source] message" and the exit status is 1.
"""

import glob
import json
import math
import os
import re
import subprocess
import sys
import tempfile
import warnings

from interop_common import expect as load_expect
from interop_common import FAILS, fail, run


def copper_files(d, layers):
    out = {}
    for layer in range(1, layers + 1):
        hits = glob.glob(os.path.join(d, "fab", f"*-L{layer}-copper-*.gbr"))
        if len(hits) != 1:
            fail("bundle", f"expected one copper file for layer {layer}, found {hits}")
            continue
        out[layer] = hits[0]
    return out


def strict_warnings():
    """Every warning of the readers becomes an error; deprecation notices
    about the readers' own use of their dependencies are not about our
    files and stay silent."""
    import pyparsing

    warnings.resetwarnings()
    warnings.simplefilter("error")
    warnings.simplefilter("ignore", DeprecationWarning)
    warnings.simplefilter("ignore", PendingDeprecationWarning)
    pdw = getattr(getattr(pyparsing, "warnings", None), "PyparsingDeprecationWarning", None)
    if pdw is not None:
        warnings.simplefilter("ignore", pdw)


# ---------------------------------------------------------------- symbol


def symbol(d):
    """kiutils (PyPI), an independent reader of KiCad 6 files."""
    from kiutils.footprint import Footprint
    from kiutils.libraries import LibTable
    from kiutils.symbol import SymbolLib

    kdir = os.path.join(d, "kicad")
    syms = glob.glob(os.path.join(kdir, "*.kicad_sym"))
    if len(syms) != 1:
        fail("kiutils", f"expected one symbol library, found {syms}")
        return
    lib = SymbolLib().from_file(syms[0])
    if len(lib.symbols) != 1:
        fail("kiutils", f"expected one symbol, found {len(lib.symbols)}")
        return
    sym = lib.symbols[0]
    pins = sorted(p.number for u in sym.units for p in u.pins)
    # An array's pins are its terminal pads ("A", "B", "C", "N", "A1" ...:
    # the layout's pads whose names are not a coil's "<coil>.<1|2>").
    lay_pads = [p["name"] for p in load_expect(d)["layout"]["pads"]]
    array = any("." in n for n in lay_pads)
    want = sorted(n for n in lay_pads if "." not in n) if array else ["1", "2"]
    if pins != want:
        fail("kiutils", f"symbol pins {pins}, expected {want}")
    props = {p.key: p.value for p in sym.properties}
    # The coil's footprint; `<name>_terminals` holds the board's pads.
    mods = [m for m in glob.glob(os.path.join(kdir, "*.pretty", "*.kicad_mod"))
            if not m.endswith("_terminals.kicad_mod")]
    fp = Footprint().from_file(mods[0])
    fp_name = os.path.basename(mods[0])[: -len(".kicad_mod")]
    if props.get("Footprint") != f"coilwright:{fp_name}":
        fail("kiutils", f"Footprint property {props.get('Footprint')!r}, expected 'coilwright:{fp_name}'")
    # A tail's spare fingers ("3" on) are pads on no net, with no pin.
    pads = sorted({p.number for p in fp.pads})
    if array:
        # Every pin is a pad; the other pads are the links between a
        # phase's coils ("A_L1" ...), joined inside the footprint.
        inner = [n for n in pads if n not in pins]
        if any(n not in pads for n in pins) or any("_L" not in n for n in inner):
            fail("kiutils", f"footprint pads {pads}: expected pins {pins} plus links <phase>_L<k>")
    else:
        spare = sorted(n for n in lay_pads if n not in ("1", "2"))
        if pads != sorted(pins + spare):
            fail("kiutils", f"footprint pads {pads} differ from symbol pins {pins} plus spare fingers {spare}")
    if not props.get("Reference"):
        fail("kiutils", "symbol has no Reference")
    for name, want in (("sym-lib-table", syms[0]), ("fp-lib-table", os.path.dirname(mods[0]))):
        table = LibTable().from_file(os.path.join(kdir, name))
        libs = [(l.name, l.uri) for l in table.libs]
        if len(libs) != 1 or libs[0][0] != "coilwright":
            fail("kiutils", f"{name}: libraries {libs}, expected one named coilwright")
            continue
        path = libs[0][1].replace("${KIPRJMOD}", kdir)
        if os.path.realpath(path) != os.path.realpath(want):
            fail("kiutils", f"{name}: {libs[0][1]} does not point at {want}")
    if not FAILS:
        print(f"symbol: kiutils reads {os.path.basename(syms[0])}: pins {pins} = footprint pads, "
              f"footprint coilwright:{fp_name}, both library tables resolve")


# ---------------------------------------------------------------- readers


def readers(d):
    from gerbonara import ExcellonFile, GerberFile
    from gerbonara.graphic_objects import Arc
    from pygerber.gerberx3.api.v2 import GerberFile as PyGerberFile
    from pygerber.gerberx3.api.v2 import OnParserErrorEnum

    strict_warnings()
    gerbers = sorted(glob.glob(os.path.join(d, "fab", "*.gbr")))
    drills = sorted(glob.glob(os.path.join(d, "fab", "*.drl")))
    if not gerbers or not drills:
        fail("bundle", f"no Gerber or drill files in {d}/fab")
    for p in gerbers:
        name = os.path.basename(p)
        try:
            g = GerberFile.open(p)
        except Exception as e:  # noqa: BLE001 - report any reader failure
            fail("gerbonara", f"{name}: {type(e).__name__}: {e}")
            continue
        # Neither reader checks that I/J match the radius at both ends.
        for o in g.objects:
            if isinstance(o, Arc):
                r1 = math.hypot(o.cx, o.cy)
                r2 = math.hypot(o.x1 + o.cx - o.x2, o.y1 + o.cy - o.y2)
                if abs(r1 - r2) > 2e-6:
                    fail("gerbonara", f"{name}: arc radius {r1:.7f} at start, {r2:.7f} at end")
        try:
            PyGerberFile.from_file(p).parse(on_parser_error=OnParserErrorEnum.Raise)
        except Exception as e:  # noqa: BLE001
            fail("pygerber", f"{name}: {type(e).__name__}: {e}")
    for p in drills:
        name = os.path.basename(p)
        try:
            # Plating is stated by the file's own X2 attribute
            # (`; #@! TF.FileFunction,Plated,...` or `NonPlated`, as the
            # Gerber specification's drill-file attributes define it):
            # check that it says what the file name promises. gerbonara
            # reads plating only from a vendor comment we do not write (and
            # ignores its own `plated=` argument), so it is asked only to
            # read the holes.
            with open(p) as fh:
                func = next((ln.strip().split(",")[1] for ln in fh
                             if ln.startswith("; #@! TF.FileFunction,")), None)
            want = "NonPlated" if "nonplated" in name else "Plated"
            if func != want:
                fail("drill", f"{name}: TF.FileFunction says {func!r}, expected {want!r}")
            e = ExcellonFile.open(p)
            if not list(e.drills()):
                fail("gerbonara", f"{name}: no drill hits")
        except Exception as ex:  # noqa: BLE001
            fail("gerbonara", f"{name}: {type(ex).__name__}: {ex}")
    print(f"readers: {len(gerbers)} Gerber files read by gerbonara and pygerber, "
          f"{len(drills)} Excellon files by gerbonara")


# ---------------------------------------------------------------- geometry

FLATTEN_TOL = 0.0002  # mm chord error; chords lie inside arcs, so gaps only shrink


def arc_points(x1, y1, x2, y2, cx, cy, clockwise):
    r = math.hypot(x1 - cx, y1 - cy)
    a1 = math.atan2(y1 - cy, x1 - cx)
    a2 = math.atan2(y2 - cy, x2 - cx)
    sweep = a2 - a1
    if clockwise:
        while sweep >= 0:
            sweep -= 2 * math.pi
    else:
        while sweep <= 0:
            sweep += 2 * math.pi
    step = 2 * math.sqrt(max(2 * FLATTEN_TOL / max(r, 1e-9), 1e-12))
    n = max(2, int(math.ceil(abs(sweep) / min(step, 0.5))))
    pts = [(cx + r * math.cos(a1 + sweep * i / n), cy + r * math.sin(a1 + sweep * i / n)) for i in range(n)]
    pts.append((x2, y2))
    return pts, r * abs(sweep)


def parse_copper(path):
    """Pieces (centre lines with width) and flashes of one copper file."""
    from gerbonara import GerberFile
    from gerbonara.graphic_objects import Arc, Flash, Line, Region

    g = GerberFile.open(path)
    pieces, flashes, regions = [], [], []
    for o in g.objects:
        if isinstance(o, Region):
            # Surface pads: straight-sided regions.
            regions.append([(x, y) for x, y in o.outline])
            continue
        if isinstance(o, Line):
            pts = [(o.x1, o.y1), (o.x2, o.y2)]
            pieces.append({"pts": pts, "len": math.dist(*pts), "w": o.aperture.diameter})
        elif isinstance(o, Arc):
            pts, length = arc_points(o.x1, o.y1, o.x2, o.y2, o.x1 + o.cx, o.y1 + o.cy, o.clockwise)
            pieces.append({"pts": pts, "len": length, "w": o.aperture.diameter})
        elif isinstance(o, Flash):
            flashes.append({"at": (o.x, o.y), "d": o.aperture.diameter})
        else:
            fail("gerbonara", f"{os.path.basename(path)}: unexpected object {type(o).__name__}")
    return pieces, flashes, regions


def geometry(d):
    import numpy as np
    import shapely
    from gerbonara import ExcellonFile

    exp = load_expect(d)
    lay = exp["layout"]
    layers = lay["layers"]
    clearance = lay["clearance"]
    pitch = lay["pitch"]
    tol = 0.001  # 1 um
    files = copper_files(d, layers)
    worst = math.inf
    copper = {}
    for layer, path in files.items():
        pieces, flashes, regions = parse_copper(path)
        # Position along the conductor: consecutive pieces that meet form a chain.
        chain, pos = [], []
        c, s = 0, 0.0
        for i, p in enumerate(pieces):
            if i > 0 and math.dist(pieces[i - 1]["pts"][-1], p["pts"][0]) > 1e-6:
                c, s = c + 1, 0.0
            chain.append(c)
            pos.append((s, s + p["len"]))
            s += p["len"]
        geoms = [shapely.LineString(p["pts"]) for p in pieces]
        widths = np.array([p["w"] for p in pieces])
        copper[layer] = (pieces, flashes, geoms)
        # Turn to turn: pieces farther apart along the conductor than three
        # pitches are different turns (or leads) and must keep the clearance.
        tree = shapely.STRtree(geoms)
        reach = 2 * max(widths.max() if len(widths) else 0, 0) + clearance
        i_idx, j_idx = tree.query(geoms, predicate="dwithin", distance=reach)
        keep = i_idx < j_idx
        i_idx, j_idx = i_idx[keep], j_idx[keep]
        if len(i_idx):
            along = np.array([
                math.inf if chain[i] != chain[j] else pos[j][0] - pos[i][1]
                for i, j in zip(i_idx, j_idx)
            ])
            far = along > 3 * pitch
            i_idx, j_idx = i_idx[far], j_idx[far]
            if len(i_idx):
                gap = shapely.distance(
                    np.array(geoms, dtype=object)[i_idx], np.array(geoms, dtype=object)[j_idx]
                ) - (widths[i_idx] + widths[j_idx]) / 2
                k = int(np.argmin(gap))
                worst = min(worst, float(gap[k]))
                if gap[k] < clearance - tol:
                    a, b = pieces[i_idx[k]]["pts"], pieces[j_idx[k]]["pts"]
                    fail("shapely", f"layer {layer}: turn-to-turn gap {gap[k]*1000:.2f} um < "
                         f"clearance {clearance*1000:.1f} um between pieces {i_idx[k]} "
                         f"({a[0]}..{a[-1]}) and {j_idx[k]} ({b[0]}..{b[-1]})")
        # Surface pads of this layer: one rectangle each, of the pad's size
        # and centred on it (source: gerbonara's reading, shapely's area).
        smd = [p for p in lay["pads"] if p.get("smd") and p["smd"]["layer"] == layer]
        if len(regions) != len(smd):
            fail("gerbonara", f"layer {layer}: {len(regions)} regions, {len(smd)} surface pads")
        for p in smd:
            want = p["smd"]["width"] * p["smd"]["length"]
            found = [r for r in regions
                     if math.dist(shapely.Polygon(r).centroid.coords[0], (p["at"]["x"], p["at"]["y"])) < tol]
            # Corners sit on the 1 nm grid: a turned rectangle's area
            # differs by up to about 1 nm x its perimeter.
            perimeter = 2 * (p["smd"]["width"] + p["smd"]["length"])
            if len(found) != 1 or abs(shapely.Polygon(found[0]).area - want) > 2e-6 * perimeter:
                fail("shapely", f"layer {layer}: surface pad {p['name']} not one "
                     f"{p['smd']['width']} x {p['smd']['length']} mm rectangle at its centre")
    # Drill hits: copper of exactly the joined layers (surface pads have none).
    nodes = [("via", v["at"], v["joins"], v["drill"]) for v in lay["vias"]]
    nodes += [("pad " + p["name"], p["at"], p["joins"], p["drill"])
              for p in lay["pads"] if not p.get("smd")]
    hits = []
    for path in glob.glob(os.path.join(d, "fab", "*.drl")):
        for o in ExcellonFile.open(path).drills():
            hits.append((o.x, o.y, o.aperture.diameter))
    if len(hits) != len(nodes):
        fail("gerbonara", f"{len(hits)} drill hits in the Excellon files, layout has {len(nodes)} holes")
    for x, y, dia in hits:
        match = [n for n in nodes if math.dist((n[1]["x"], n[1]["y"]), (x, y)) < 1e-6]
        if len(match) != 1:
            fail("gerbonara", f"drill hit at ({x}, {y}) matches {len(match)} layout holes")
            continue
        kind, _, joins, drill = match[0]
        if abs(dia - drill) > 1e-6:
            fail("gerbonara", f"{kind} at ({x}, {y}): drill {dia} in file, {drill} in layout")
        track_layers, land_layers = [], []
        for layer, (pieces, flashes, geoms) in copper.items():
            garr = np.array(geoms, dtype=object)
            warr = np.array([p["w"] for p in pieces])
            dist_c = shapely.distance(garr, shapely.Point(x, y)) if len(geoms) else np.array([])
            touches_track = bool(np.any(dist_c < warr / 2 + dia / 2))
            on_land = any(math.dist(f["at"], (x, y)) < 1e-6 and f["d"] > dia for f in flashes)
            if touches_track:
                track_layers.append(layer)
            if on_land:
                land_layers.append(layer)
            if layer not in joins and touches_track:
                fail("shapely", f"{kind} at ({x:.4f}, {y:.4f}) touches copper of layer {layer}, "
                     f"which it does not join {joins}")
            if layer not in joins:
                # The plated barrel of the hole must clear foreign copper.
                dmin = float(np.min(dist_c - dia / 2 - warr / 2)) if len(geoms) else math.inf
                if dmin < clearance - tol:
                    fail("shapely", f"{kind} at ({x:.4f}, {y:.4f}): hole is {dmin*1000:.1f} um from "
                         f"copper of layer {layer} (not joined), clearance {clearance*1000:.1f} um")
        if sorted(track_layers) != sorted(joins):
            fail("shapely", f"{kind} at ({x:.4f}, {y:.4f}): tracks reach it on layers {track_layers}, "
                 f"it joins {joins}")
        want_land = list(range(1, layers + 1)) if kind.startswith("pad") else sorted(joins)
        if sorted(land_layers) != want_land:
            fail("shapely", f"{kind} at ({x:.4f}, {y:.4f}): lands on layers {land_layers}, expected {want_land}")
    print(f"geometry: smallest turn-to-turn gap {worst*1000:.2f} um "
          f"(clearance {clearance*1000:.1f} um), {len(hits)} drill hits checked")


# ---------------------------------------------------------------- raster

def render(gbr, origin, size, dpi, out):
    subprocess.run(
        ["gerbv", "-x", "png", "-D", str(dpi), "-B", "0",
         "-O", f"{origin[0]:.6f}x{origin[1]:.6f}", "-W", f"{size[0]:.6f}x{size[1]:.6f}",
         "-b", "#FFFFFF", "-f", "#000000FF", "-o", out, gbr],
        check=True, capture_output=True,
    )
    if not os.path.exists(out) or os.path.getsize(out) == 0:
        raise RuntimeError(f"gerbv wrote no image for {gbr}")


def raster(d, kdir):
    import numpy as np
    from PIL import Image

    exp = load_expect(d)
    lay = exp["layout"]
    layers = lay["layers"]
    ours = copper_files(d, layers)
    # Frame: the outline bounds plus 1 mm, in inches from the lower left.
    lo, hi = exp["outline_bounds"]
    m = 1.0
    origin = ((lo[0] - m) / 25.4, (lo[1] - m) / 25.4)
    size = ((hi[0] - lo[0] + 2 * m) / 25.4, (hi[1] - lo[1] + 2 * m) / 25.4)
    dpi = int(min(4000, max(1000, 2500 / max(size))))
    worst = 0.0
    with tempfile.TemporaryDirectory() as t:
        for layer in range(1, layers + 1):
            kf = os.path.join(kdir, f"L{layer}.gbr")
            if layer not in ours or not os.path.exists(kf):
                fail("KiCad 6 pcbnew", f"no KiCad plot for layer {layer}")
                continue
            a_png, b_png = os.path.join(t, "a.png"), os.path.join(t, "b.png")
            render(ours[layer], origin, size, dpi, a_png)
            render(kf, origin, size, dpi, b_png)
            a = np.asarray(Image.open(a_png).convert("L")) < 128
            b = np.asarray(Image.open(b_png).convert("L")) < 128
            if a.shape != b.shape:
                fail("gerbv", f"layer {layer}: image sizes differ {a.shape} {b.shape}")
                continue
            # KiCad 6.0 plots via lands on every layer although the vias keep
            # them only on connected layers (remove_unused_layers; pcbnew's
            # FlashLayer() is false there): blank those discs in both images.
            h, w = a.shape
            yy, xx = np.mgrid[0:h, 0:w]
            for v in lay["vias"]:
                if layer in v["joins"]:
                    continue
                px = (v["at"]["x"] - (lo[0] - m)) / 25.4 * dpi
                py = h - (v["at"]["y"] - (lo[1] - m)) / 25.4 * dpi
                rad = v["diameter"] / 2 / 25.4 * dpi + 2
                disc = (xx - px) ** 2 + (yy - py) ** 2 <= rad * rad
                a = a & ~disc
                b = b & ~disc
            union = np.count_nonzero(a | b)
            diff = np.count_nonzero(a ^ b)
            frac = diff / max(union, 1)
            worst = max(worst, frac)
            if union == 0 or frac > 0.005:
                fail("gerbv", f"layer {layer}: {diff} of {union} copper pixels differ "
                     f"({frac*100:.3f} %) between our Gerber and KiCad's plot of our board")
    print(f"raster: {layers} layers at {dpi} dpi, worst difference {worst*100:.3f} % of copper pixels")


# ---------------------------------------------------------------- dxf

DXF_LENGTH_TOL = 0.001  # relative, issue 16


def dxf_entity_length(e):
    """Centre-line length of one DXF entity as ezdxf reads it (its own
    geometry, bulges turned into arcs by ezdxf.math)."""
    from ezdxf.math import bulge_to_arc

    kind = e.dxftype()
    if kind == "LINE":
        return e.dxf.start.distance(e.dxf.end)
    if kind == "ARC":
        sweep = (e.dxf.end_angle - e.dxf.start_angle) % 360.0
        return math.radians(sweep) * e.dxf.radius
    if kind == "LWPOLYLINE":
        pts = list(e.get_points("xyb"))
        if e.closed:
            pts.append(pts[0])
        total = 0.0
        for (x1, y1, b), (x2, y2, _) in zip(pts, pts[1:]):
            if abs(b) < 1e-15:
                total += math.dist((x1, y1), (x2, y2))
            else:
                _c, a1, a2, r = bulge_to_arc((x1, y1), (x2, y2), b)
                total += r * ((a2 - a1) % (2 * math.pi))
        return total
    return 0.0


def gerber_length(path):
    """Total drawn (D01) length of a Gerber as gerbonara reads it."""
    from gerbonara import GerberFile
    from gerbonara.graphic_objects import Arc, Line

    total = 0.0
    for o in GerberFile.open(path).objects:
        if isinstance(o, Line):
            total += math.dist((o.x1, o.y1), (o.x2, o.y2))
        elif isinstance(o, Arc):
            total += arc_points(o.x1, o.y1, o.x2, o.y2, o.x1 + o.cx, o.y1 + o.cy, o.clockwise)[1]
    return total


def dxf(d):
    """Source: ezdxf (independent DXF reader with an auditor) and gerbonara
    (the Gerber side of the comparison)."""
    import ezdxf

    exp = load_expect(d)
    layers = exp["layout"]["layers"]
    files = sorted(glob.glob(os.path.join(d, "dxf", "*.dxf")))
    if len(files) != layers + 1:
        fail("bundle", f"expected {layers + 1} DXF files, found {len(files)}")
    for f in files:
        doc = ezdxf.readfile(f)
        auditor = doc.audit()
        if auditor.has_errors:
            fail("ezdxf", f"{os.path.basename(f)}: audit errors "
                 f"{[str(e.message) for e in auditor.errors]}")
        if doc.units != ezdxf.units.MM:
            fail("ezdxf", f"{os.path.basename(f)}: drawing units {doc.units}, want mm")
    worst = 0.0
    for layer, gbr in copper_files(d, layers).items():
        path = glob.glob(os.path.join(d, "dxf", f"*-L{layer}-copper.dxf"))
        if len(path) != 1:
            fail("bundle", f"no copper DXF for layer {layer}")
            continue
        msp = ezdxf.readfile(path[0]).modelspace()
        got = sum(dxf_entity_length(e) for e in msp.query('LWPOLYLINE[layer=="TRACKS"]'))
        want = gerber_length(gbr)
        rel = abs(got - want) / max(want, 1e-9)
        worst = max(worst, rel)
        if rel > DXF_LENGTH_TOL:
            fail("ezdxf", f"layer {layer}: DXF track length {got:.4f} mm, Gerber {want:.4f} mm")
        widths = {round(e.dxf.const_width, 6) for e in msp.query("LWPOLYLINE[layer==\"TRACKS\"]")}
        tracks = {round(t["width"], 6) for t in exp["layout"]["tracks"] if t["layer"] == layer}
        if widths != tracks:
            fail("ezdxf", f"layer {layer}: polyline widths {widths}, tracks {tracks}")
    prof = glob.glob(os.path.join(d, "fab", "*-profile.gbr"))
    outl = glob.glob(os.path.join(d, "dxf", "*-outline.dxf"))
    if len(prof) == 1 and len(outl) == 1:
        got = sum(dxf_entity_length(e) for e in ezdxf.readfile(outl[0]).modelspace())
        want = gerber_length(prof[0])
        rel = abs(got - want) / max(want, 1e-9)
        worst = max(worst, rel)
        if rel > DXF_LENGTH_TOL:
            fail("ezdxf", f"outline length {got:.4f} mm, profile Gerber {want:.4f} mm")
    else:
        fail("bundle", "outline DXF or profile Gerber missing")
    print(f"dxf: {len(files)} DXF files read and audited by ezdxf, worst length "
          f"difference from the Gerbers {worst*100:.4f} %")


# ---------------------------------------------------------------- tail


def tail(d):
    """A flex tail's fingers, coverlay openings and stiffener as read by
    gerbonara (PyPI), measured with shapely (PyPI). Nothing to do (and
    says so) for a design without a tail."""
    import shapely
    from gerbonara import GerberFile
    from gerbonara.graphic_objects import Region

    exp = load_expect(d)
    t, lay = exp["design"].get("tail"), exp["layout"]
    if not t:
        print("tail: none")
        return
    tol = 0.001  # 1 um, by the issue
    fingers = [lay["pads"][i] for i in lay["tail"]["fingers"]]
    layer = fingers[0]["smd"]["layer"]
    side = "top" if layer == 1 else "bottom"

    def regions(path):
        g = GerberFile.open(path)
        return [shapely.Polygon([(x, y) for x, y in o.outline])
                for o in g.objects if isinstance(o, Region)]

    def matching(polys, p):
        at = (p["at"]["x"], p["at"]["y"])
        return [q for q in polys if math.dist(q.centroid.coords[0], at) < tol]

    copper = regions(copper_files(d, lay["layers"])[layer])
    found = []
    for p in fingers:
        m = matching(copper, p)
        if len(m) != 1:
            fail("gerbonara", f"finger {p['name']}: {len(m)} copper regions at its centre")
            return
        found.append(m[0])
    want = t["pitch"] - t["finger_width"]
    worst = 0.0
    for a, b in zip(found, found[1:]):
        gap = a.distance(b)
        worst = max(worst, abs(gap - want))
        if abs(gap - want) > tol:
            fail("shapely", f"finger gap {gap:.6f} mm, pitch - finger_width = {want:.6f} mm")
    # The coverlay of the fingers' face is opened exactly over each finger.
    cover = glob.glob(os.path.join(d, "fab", f"*-coverlay-{side}.gbr"))
    if len(cover) != 1:
        fail("bundle", f"expected one coverlay file on the {side}, found {cover}")
        return
    openings = regions(cover[0])
    for p, f in zip(fingers, found):
        m = matching(openings, p)
        if len(m) != 1 or m[0].symmetric_difference(f).area > 1e-6:
            fail("shapely", f"finger {p['name']}: coverlay opening is not the finger")
    stiff = glob.glob(os.path.join(d, "fab", "*-stiffener.gbr"))
    if t["stiffener"] > 0:
        if len(stiff) != 1:
            fail("bundle", f"expected one stiffener drawing, found {stiff}")
            return
        sr = regions(stiff[0])
        if len(sr) != 1 or not all(sr[0].buffer(tol).contains(f) for f in found):
            fail("shapely", "the stiffener is not one region covering every finger")
    elif stiff:
        fail("bundle", f"stiffener drawing {stiff} without a stiffener")
    print(f"tail: {len(found)} fingers read by gerbonara, gaps = pitch - finger_width "
          f"within {worst*1000:.4f} um, coverlay opened over each, stiffener "
          f"{'covers them' if t['stiffener'] > 0 else 'none'}")


def nets(d, clearance):
    """Copper of different nets keeps `clearance` (mm) on every layer: each
    object of each copper Gerber (gerbonara, PyPI) drawn with shapely (PyPI)
    at its aperture's width, united per net (the Gerber's .N attribute);
    no two nets closer than the clearance less 1 um. Component (terminal)
    pads are left out: at a coil's pad 2 the coil itself joins two nets
    (KiCad's DRC, with the net-tie terminals footprint, checks them)."""
    import shapely
    from gerbonara import GerberFile
    from gerbonara.graphic_objects import Arc, Flash, Line, Region

    need = float(clearance) - 1e-3
    files = sorted(glob.glob(os.path.join(d, "fab", "*-L*-copper-*.gbr")))
    if not files:
        fail("bundle", f"no copper Gerbers in {d}/fab")
    worst = math.inf
    for path in files:
        by_net = {}
        for o in GerberFile.open(path).objects:
            net = (getattr(o, "attrs", {}) or {}).get(".N")
            if not net:
                fail("gerbonara", f"{os.path.basename(path)}: an object without a net")
                continue
            if isinstance(o, Line):
                g = shapely.LineString([(o.x1, o.y1), (o.x2, o.y2)]).buffer(o.aperture.diameter / 2)
            elif isinstance(o, Arc):
                pts, _ = arc_points(o.x1, o.y1, o.x2, o.y2, o.x1 + o.cx, o.y1 + o.cy, o.clockwise)
                g = shapely.LineString(pts).buffer(o.aperture.diameter / 2)
            elif isinstance(o, Flash):
                if ("ComponentPad",) in dict(o.aperture.attrs or ()).values():
                    continue
                g = shapely.Point(o.x, o.y).buffer(o.aperture.diameter / 2)
            elif isinstance(o, Region):
                continue  # surface pads: terminals too
            else:
                continue
            by_net.setdefault(net[0], []).append(g)
        names = sorted(by_net)
        shapes = {n: shapely.union_all(by_net[n]) for n in names}
        for i, a in enumerate(names):
            for b in names[i + 1:]:
                gap = shapes[a].distance(shapes[b])
                worst = min(worst, gap)
                if gap < need:
                    fail("shapely", f"{os.path.basename(path)}: nets {a} and {b} are "
                         f"{gap*1000:.1f} um apart, {float(clearance)*1000:.1f} um needed")
    print(f"nets: {len(files)} copper layers, different nets at least {worst*1000:.1f} um apart")


def phase_walk(d):
    """Each phase's track resistance walked on the exported copper: every
    line and arc of every copper Gerber (gerbonara, PyPI) is a resistor
    rho L / (w t) (its length exact, arcs r |sweep|; w the aperture; t the
    layer's copper from the design; rho 1.7241e-8 ohm m, annealed copper
    at 20 C, IEC 60028), joined where ends meet on a layer and through
    every flashed land (via or pad) to the other layers' lands at the same
    point; a phase's resistance is the cheapest path (Dijkstra) between its
    two terminal pads (`<phase>1` and `<phase>2`: the design must have
    separate phase ends). Via barrels count nothing, as in the report's
    `array.phases[].tracks_ohm_20c`, which must agree within 1e-6."""
    import heapq
    from gerbonara import GerberFile
    from gerbonara.graphic_objects import Arc, Flash, Line

    rho = 1.7241e-8
    exp = load_expect(d)
    copper = exp["design"]["stackup"]["copper"]
    with open(os.path.join(d, "report.json")) as f:
        report = json.load(f)
    graph = {}

    def edge(a, b, ohm):
        graph.setdefault(a, []).append((b, ohm))
        graph.setdefault(b, []).append((a, ohm))

    def key(layer, x, y):
        return (layer, round(x * 1e4), round(y * 1e4))

    pads = {}
    lands = []
    for path in sorted(glob.glob(os.path.join(d, "fab", "*-L*-copper-*.gbr"))):
        layer = int(re.search(r"-L(\d+)-copper-", path).group(1))
        t = copper[layer - 1] * 1e-3
        for o in GerberFile.open(path).objects:
            if isinstance(o, Line):
                length = math.hypot(o.x2 - o.x1, o.y2 - o.y1)
            elif isinstance(o, Arc):
                _, length = arc_points(o.x1, o.y1, o.x2, o.y2, o.x1 + o.cx, o.y1 + o.cy, o.clockwise)
            elif isinstance(o, Flash):
                lands.append((layer, o.x, o.y, o.aperture.diameter / 2))
                name = ((getattr(o, "attrs", {}) or {}).get(".P") or [None, None])[1]
                if name:
                    pads[name] = (o.x, o.y)
                continue
            else:
                continue
            w = o.aperture.diameter * 1e-3
            edge(key(layer, o.x1, o.y1), key(layer, o.x2, o.y2), rho * length * 1e-3 / (w * t))
    # Lands: every track end on the land's layer within its radius joins the
    # land's point, which joins the same point on every layer.
    ends = {}
    for k in graph:
        ends.setdefault(k[0], []).append(k)
    for (layer, x, y, r) in lands:
        centre = ("land", round(x * 1e4), round(y * 1e4))
        for k in ends.get(layer, []):
            if math.hypot(k[1] * 1e-4 - x, k[2] * 1e-4 - y) <= r:
                edge(k, centre, 0.0)

    def walk(a, b):
        start = ("land", round(a[0] * 1e4), round(a[1] * 1e4))
        goal = ("land", round(b[0] * 1e4), round(b[1] * 1e4))
        best = {start: 0.0}
        queue = [(0.0, start)]
        while queue:
            c, n = heapq.heappop(queue)
            if n == goal:
                return c
            if c > best.get(n, math.inf):
                continue
            for m, w in graph.get(n, []):
                if c + w < best.get(m, math.inf):
                    best[m] = c + w
                    heapq.heappush(queue, (c + w, m))
        return None

    worst = 0.0
    for ph in report["array"]["phases"]:
        name = ph["name"]
        if f"{name}1" not in pads or f"{name}2" not in pads:
            fail("bundle", f"phase {name}: no pads {name}1 and {name}2 in the copper Gerbers")
            continue
        ohm = walk(pads[f"{name}1"], pads[f"{name}2"])
        if ohm is None:
            fail("gerbonara", f"phase {name}: no copper path from {name}1 to {name}2")
            continue
        rel = abs(ohm / ph["tracks_ohm_20c"] - 1)
        worst = max(worst, rel)
        if rel > 1e-6:
            fail("gerbonara", f"phase {name}: {ohm:.6f} ohm walked on the Gerbers, "
                 f"{ph['tracks_ohm_20c']:.6f} ohm reported")
    print(f"phase_walk: {len(report['array']['phases'])} phases walked on the Gerbers, "
          f"within {worst:.1e} of the report")


if __name__ == "__main__":
    run({"symbol": symbol, "readers": readers, "geometry": geometry, "dxf": dxf,
         "raster": raster, "tail": tail, "nets": nets, "phase_walk": phase_walk})
