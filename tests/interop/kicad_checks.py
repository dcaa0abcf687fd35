"""Checks with KiCad 6 itself (Debian's /usr/bin/python3 and its pcbnew).

    kicad_checks.py footprint DIR   the footprint loads; every arc keeps its
                                    intended side; placed on a board with the
                                    coil's copper layers and its terminals on
                                    two nets, DRC finds 0 violations and 0
                                    unconnected pads; the rule area forbids
                                    copper pour
    kicad_checks.py board DIR       our .kicad_pcb loads with 0 violations
                                    and 0 unconnected pads
    kicad_checks.py plot DIR OUT    KiCad plots our board's copper layers to
                                    Gerber files OUT/L<n>.gbr (aux origin =
                                    coil centre, so they share our frame)

DIR holds the bundle plus expect.json. Each failure is printed as
"FAIL [KiCad 6 pcbnew] message"; exit status 1 on failure. Parse errors can
abort the process (exit 134): the Rust driver runs every call in its own
process.
"""

import glob
import math
import os
import re
import sys
import tempfile

import pcbnew

from interop_common import expect, run
from interop_common import fail as fail_from

SRC = "KiCad 6 pcbnew"


def fail(msg):
    fail_from(SRC, msg)


def drc(board, path):
    pcbnew.WriteDRCReport(board, path, pcbnew.EDA_UNITS_MILLIMETRES, True)
    with open(path) as f:
        text = f.read()
    v = re.search(r"Found (\d+) DRC violations", text)
    u = re.search(r"Found (\d+) unconnected pads", text)
    if not v or not u:
        fail(f"cannot read DRC report:\n{text}")
        return None, None, text
    return int(v.group(1)), int(u.group(1)), text


def cu_name(layer, layers):
    if layer == 1:
        return "F.Cu"
    if layer == layers:
        return "B.Cu"
    return f"In{layer - 1}.Cu"


def check_arcs(shapes, file_arcs, offset, where):
    """Each loaded arc shape must be one of the file's arcs: same start, end
    and mid point, each file arc used once (KiCad 6 may load an arc as its
    complement: same ends, other side). Returns the number checked."""
    n = 0
    ox, oy = offset
    unused = list(file_arcs)
    for g in shapes:
        st = (pcbnew.ToMM(g.GetStart().x) - ox, pcbnew.ToMM(g.GetStart().y) - oy)
        en = (pcbnew.ToMM(g.GetEnd().x) - ox, pcbnew.ToMM(g.GetEnd().y) - oy)
        m = g.GetArcMid()
        mid = (pcbnew.ToMM(m.x) - ox, pcbnew.ToMM(m.y) - oy)
        k = next((i for i, a in enumerate(unused)
                  if math.dist(a[0], st) < 0.002 and math.dist(a[2], en) < 0.002
                  and math.dist(a[1], mid) < 0.002), None)
        if k is None:
            fail(f"{where}: arc {st} .. {en} loads with mid {mid}, which no arc of the file "
                 f"has: KiCad drew an arc on its other side")
        else:
            unused.pop(k)
        n += 1
    if n != len(file_arcs):
        fail(f"{where}: {len(file_arcs)} arcs in the file, {n} loaded")
    return n


def arcs_in_file(text, kind="(?:fp|gr)"):
    """(start, mid, end) of every arc of `kind` in a file, KiCad frame, mm."""
    out = []
    num = r"(-?[\d.]+)"
    pat = re.compile(r"\(" + kind + r"_arc \(start " + num + " " + num + r"\) \(mid " + num + " " + num
                     + r"\) \(end " + num + " " + num + r"\)")
    for m in pat.finditer(text):
        v = [float(x) for x in m.groups()]
        out.append(((v[0], v[1]), (v[2], v[3]), (v[4], v[5])))
    return out


def footprint(d):
    exp = expect(d)
    lay = exp["layout"]
    layers = lay["layers"]
    libs = glob.glob(os.path.join(d, "kicad", "*.pretty"))
    if len(libs) != 1:
        fail(f"expected one .pretty library, found {libs}")
        return
    lib = os.path.abspath(libs[0])
    # The coil's footprint; `<name>_terminals` holds the board's pads
    # (checked against the board's copy in `board`).
    mods = [m for m in glob.glob(os.path.join(lib, "*.kicad_mod"))
            if not m.endswith("_terminals.kicad_mod")]
    name = os.path.basename(mods[0])[: -len(".kicad_mod")]
    fp = pcbnew.FootprintLoad(lib, name)
    if fp is None:
        fail(f"footprint {name} does not load")
        return
    if not fp.IsNetTie():
        fail("footprint is not a net tie")
    # Arcs keep their intended side: KiCad's mid point of each arc must be
    # the file's (arcs matched by their end points).
    with open(mods[0]) as f:
        text = f.read()
    shapes = [g for g in fp.GraphicalItems()
              if g.GetClass() == "MGRAPHIC" and g.GetShape() == pcbnew.SHAPE_T_ARC]
    checked = check_arcs(shapes, [a for a in arcs_in_file(text, "fp")], (0.0, 0.0), "footprint")
    # Arcs inside custom pads (primitives are not reachable from Python in
    # 6.0): the mid point of every file arc must lie in the copper KiCad
    # builds for its pad; a flipped arc leaves it bare.
    pad_arcs = 0
    for (ax, ay, layer_name, mids) in file_pad_arcs(text):
        pads = [p for p in fp.Pads() if p.GetShape() == pcbnew.PAD_SHAPE_CUSTOM
                and abs(pcbnew.ToMM(p.GetPosition().x) - ax) < 1e-6
                and abs(pcbnew.ToMM(p.GetPosition().y) - ay) < 1e-6
                and p.IsOnLayer(fp.GetBoard().GetLayerID(layer_name) if fp.GetBoard() else
                                pcbnew.BOARD().GetLayerID(layer_name))]
        if len(pads) != 1:
            fail(f"custom pad at ({ax}, {ay}) on {layer_name}: found {len(pads)} in KiCad")
            continue
        poly = pcbnew.SHAPE_POLY_SET()
        pads[0].MergePrimitivesAsPolygon(poly)  # pad-local coordinates
        for (mx, my) in mids:
            if not poly.Contains(pcbnew.VECTOR2I(pcbnew.FromMM(mx - ax), pcbnew.FromMM(my - ay))):
                fail(f"pad arc with mid ({mx}, {my}) on {layer_name}: no copper there in KiCad "
                     f"(arc flipped to its other side)")
            pad_arcs += 1
    # Rule area.
    zones = list(fp.Zones())
    if not zones or not all(z.GetIsRuleArea() and z.GetDoNotAllowCopperPour() for z in zones):
        fail("no rule area forbidding copper pour in the footprint")
    # On a board, terminals on two nets: DRC.
    b = pcbnew.BOARD()
    # KiCad boards have an even number of copper layers (2 at least).
    b.SetCopperLayerCount(max(2, layers + layers % 2))
    ds = b.GetDesignSettings()
    ds.m_TrackMinWidth = pcbnew.FromMM(lay["trace_width"])
    ds.m_MinClearance = pcbnew.FromMM(lay["clearance"])
    # Surface pads have no hole.
    drills = [v["drill"] for v in lay["vias"]] + [p["drill"] for p in lay["pads"] if not p.get("smd")]
    ds.m_MinThroughDrill = pcbnew.FromMM(min(drills))
    ds.m_HoleToHoleMin = pcbnew.FromMM(lay["clearance"])
    ds.m_HoleClearance = pcbnew.FromMM(lay["clearance"])
    if lay["vias"]:
        ds.m_ViasMinSize = pcbnew.FromMM(min(v["diameter"] for v in lay["vias"]))
        ds.m_ViasMinAnnularWidth = pcbnew.FromMM(min((v["diameter"] - v["drill"]) / 2 for v in lay["vias"]))
    cx, cy = 100.0, 100.0
    fp.SetPosition(pcbnew.wxPointMM(cx, cy))
    b.Add(fp)
    # Board outline: a rectangle 2 mm outside the footprint's outline.
    lo, hi = exp["outline_bounds"]
    x0, x1 = cx + lo[0] - 2, cx + hi[0] + 2
    y0, y1 = cy - hi[1] - 2, cy - lo[1] + 2
    corners = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
    for i in range(4):
        s = pcbnew.PCB_SHAPE(b)
        s.SetShape(pcbnew.SHAPE_T_SEGMENT)
        s.SetStart(pcbnew.wxPointMM(*corners[i]))
        s.SetEnd(pcbnew.wxPointMM(*corners[(i + 1) % 4]))
        s.SetLayer(pcbnew.Edge_Cuts)
        s.SetWidth(pcbnew.FromMM(0.05))
        b.Add(s)
    names = sorted({p.GetName() for p in fp.Pads()})
    if any(not n.isdigit() for n in names):
        # An array: every pad on the net of its own name ("A", "N",
        # "A_L1" ...), so a break inside any net shows as unconnected.
        nets = {n: pcbnew.NETINFO_ITEM(b, n) for n in names}
        for n in nets.values():
            b.Add(n)
        for p in fp.Pads():
            p.SetNet(nets[p.GetName()])
    else:
        na = pcbnew.NETINFO_ITEM(b, "COIL_1")
        nb = pcbnew.NETINFO_ITEM(b, "COIL_2")
        b.Add(na)
        b.Add(nb)
        # Pads "1" (terminal 1 and the vias) and "2"; a tail's spare fingers
        # ("3" on) stay on no net.
        for p in fp.Pads():
            if p.GetName() in ("1", "2"):
                p.SetNet(nb if p.GetName() == "2" else na)
    with tempfile.TemporaryDirectory() as t:
        path = os.path.join(t, "placed.kicad_pcb")
        pcbnew.SaveBoard(path, b)
        b2 = pcbnew.LoadBoard(path)
        v, u, text = drc(b2, os.path.join(t, "placed.rpt"))
    if v != 0 or u != 0:
        fail(f"footprint on a board: {v} DRC violations, {u} unconnected pads\n{text}")
    print(f"footprint: loads, net tie, {checked} fp_arcs and {pad_arcs} pad arcs keep their side, "
          f"rule area ok, DRC {v} violations / {u} unconnected")


def file_pad_arcs(text):
    """(anchor x, anchor y, layer, [arc mid points]) of every custom pad in a
    footprint file, footprint coordinates, mm."""
    out = []
    pat = r"\(pad \"[^\"]*\" smd custom \(at (-?[\d.]+) (-?[\d.]+)\) \(size [^)]*\) \(layers \"([^\"]+)\"\)(.*?)\n    \)\)"
    for pm in re.finditer(pat, text, re.S):
        ax, ay = float(pm.group(1)), float(pm.group(2))
        mids = [(a[1][0] + ax, a[1][1] + ay) for a in arcs_in_file(pm.group(4))]
        out.append((ax, ay, pm.group(3), mids))
    return out


def load_board(d):
    boards = glob.glob(os.path.join(d, "kicad", "*.kicad_pcb"))
    if len(boards) != 1:
        fail(f"expected one board, found {boards}")
        return None
    b = pcbnew.LoadBoard(os.path.abspath(boards[0]))
    if b is None:
        fail(f"{boards[0]} does not load")
    return b


def board(d):
    exp = expect(d)
    lay = exp["layout"]
    b = load_board(d)
    if b is None:
        return
    want = len(lay["tracks"])
    got = len([t for t in b.GetTracks() if t.GetClass() != "PCB_VIA"])
    vias = len([t for t in b.GetTracks() if t.GetClass() == "PCB_VIA"])
    if got != want or vias != len(lay["vias"]):
        fail(f"board has {got} tracks and {vias} vias, layout {want} and {len(lay['vias'])}")
    # Arcs of tracks keep their side: compare with the layout's mid points.
    mids = []
    for t in lay["tracks"]:
        s = t["segment"]
        if s["kind"] == "arc":
            c, st, sw = s["center"], s["start"], s["sweep"]
            a0 = math.atan2(st["y"] - c["y"], st["x"] - c["x"]) + sw / 2
            r = math.dist((st["x"], st["y"]), (c["x"], c["y"]))
            mids.append((100 + c["x"] + r * math.cos(a0), 100 - (c["y"] + r * math.sin(a0))))
    for t in b.GetTracks():
        if t.GetClass() == "PCB_ARC":
            m = t.GetMid()
            mid = (pcbnew.ToMM(m.x), pcbnew.ToMM(m.y))
            if not any(math.dist(mid, x) < 0.002 for x in mids):
                fail(f"track arc mid {mid} is not on the layout's arc")
    # The board's terminals footprint resolves in the generated library
    # (nickname "coilwright" in fp-lib-table): KiCad loads it from there
    # with the same pads at the same places as the board's copy.
    fps = list(b.GetFootprints())
    if len(fps) != 1:
        fail(f"board has {len(fps)} footprints, expected the terminals")
        return
    fpid = fps[0].GetFPID()
    nick, item = str(fpid.GetLibNickname()), str(fpid.GetLibItemName())
    libs = glob.glob(os.path.join(d, "kicad", "*.pretty"))
    lib_fp = pcbnew.FootprintLoad(os.path.abspath(libs[0]), item) if libs else None
    if nick != "coilwright" or lib_fp is None:
        fail(f"board footprint {nick}:{item} is not in the generated library")
        return
    at = fps[0].GetPosition()
    def pads(fp, origin):
        return sorted((p.GetNumber(), round(pcbnew.ToMM(p.GetPosition().x - origin.x), 4),
                       round(pcbnew.ToMM(p.GetPosition().y - origin.y), 4)) for p in fp.Pads())
    if pads(fps[0], at) != pads(lib_fp, lib_fp.GetPosition()):
        fail(f"board terminals {pads(fps[0], at)} differ from the library's {pads(lib_fp, lib_fp.GetPosition())}")
    boards = glob.glob(os.path.join(d, "kicad", "*.kicad_pcb"))
    with open(boards[0]) as f:
        btext = f.read()
    edge = [g for g in b.GetDrawings()
            if g.GetClass() == "PCB_SHAPE" and g.GetShape() == pcbnew.SHAPE_T_ARC]
    check_arcs(edge, arcs_in_file(btext, "gr"), (0.0, 0.0), "board outline")
    with tempfile.TemporaryDirectory() as t:
        v, u, text = drc(b, os.path.join(t, "board.rpt"))
    if v != 0 or u != 0:
        fail(f"our board: {v} DRC violations, {u} unconnected pads\n{text}")
    print(f"board: {got} tracks, {vias} vias, DRC {v} violations / {u} unconnected")


def plot(d, out):
    exp = expect(d)
    layers = exp["layout"]["layers"]
    b = load_board(d)
    if b is None:
        return
    os.makedirs(out, exist_ok=True)
    # Vias keep lands only on connected layers (remove_unused_layers); the
    # plotter asks the connectivity, which KiCad's editor builds on opening.
    b.BuildConnectivity()
    pc = pcbnew.PLOT_CONTROLLER(b)
    po = pc.GetPlotOptions()
    po.SetOutputDirectory(out)
    po.SetUseGerberX2format(True)
    po.SetGerberPrecision(6)
    po.SetDisableGerberMacros(True)
    po.SetUseAuxOrigin(True)
    po.SetExcludeEdgeLayer(True)
    po.SetPlotFrameRef(False)
    po.SetPlotReference(False)
    po.SetPlotValue(False)
    po.SetSkipPlotNPTH_Pads(False)
    for layer in range(1, layers + 1):
        name = cu_name(layer, layers)
        pc.SetLayer(b.GetLayerID(name))
        pc.OpenPlotfile(f"L{layer}", pcbnew.PLOT_FORMAT_GERBER, name)
        pc.PlotLayer()
        src = pc.GetPlotFileName()
        pc.ClosePlot()
        os.replace(src, os.path.join(out, f"L{layer}.gbr"))
    print(f"plot: {layers} copper layers plotted by KiCad")


def stator(d):
    """An array's board (many coils, one net per bus): KiCad 6 loads it and
    its DRC finds 0 violations (copper of different nets keeps the board's
    clearance) and 0 unconnected pads (every coil and bus joined on its
    net); each phase terminal pad (A, B, C, N, A1 ...) sits on the net of
    its own name."""
    b = load_board(d)
    if b is None:
        return
    v, u, text = drc(b, os.path.join(d, "drc-stator.txt"))
    if v != 0 or u != 0:
        fail(f"stator board DRC: {v} violations, {u} unconnected\n{text}")
    terminals = []
    for fp in b.GetFootprints():
        for p in fp.Pads():
            name = p.GetName()
            if "." in name:
                continue  # a coil's own pad "<coil>.1" / "<coil>.2"
            terminals.append(name)
            if p.GetNetname() != name:
                fail(f"terminal pad {name} is on net {p.GetNetname()!r}")
    if not terminals:
        fail("no phase terminal pads on the stator board")
    nets = [str(k) for k in b.GetNetsByName().keys()]
    print(f"stator: DRC 0 violations, 0 unconnected; terminals {sorted(terminals)}; {len(nets)} nets")


if __name__ == "__main__":
    run({"footprint": footprint, "board": board, "plot": plot, "stator": stator})
