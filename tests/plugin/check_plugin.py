"""The Emberlith plugin in the real viewer (pvbatch under Xvfb).

Loads the built plugin, runs the three filters on the fixture written by
emberlith-test-fixture, and checks: the published time steps; temperatures at probe nodes
equal to the core library's own run of the same model (reference.csv) to round-off;
scrubbing back in time does not solve again; the viewer's Contour and Slice on the output;
isotherm surfaces and the isotherm-depth map (far-field depth against the linear geotherm,
T = 10 °C + 30 K/km · depth, the initial state set here); a non-blank rendered screenshot;
and the failure paths (2-D cells, missing region array, unreadable property file), each of
which must give an error message and no output, not a crash.

Usage: pvbatch check_plugin.py PLUGIN FIXTURE_DIR OUTPUT_DIR
"""
import csv
import math
import os
import sys

from paraview.simple import *  # noqa: F401,F403 (the viewer's scripting API)
from paraview import servermanager
from vtkmodules.vtkCommonCore import vtkOutputWindow, vtkStringOutputWindow

plugin, fixture, outdir = sys.argv[1], sys.argv[2], sys.argv[3]
os.makedirs(outdir, exist_ok=True)
failures = []


def say(text):
    # pvbatch routes Python's stdout through vtkOutputWindow, which this script captures.
    sys.__stdout__.write(text + "\n")
    sys.__stdout__.flush()


def check(ok, what):
    say(("ok   " if ok else "FAIL ") + what)
    if not ok:
        failures.append(what)


messages = vtkStringOutputWindow()
vtkOutputWindow.SetInstance(messages)


def excepthook(kind, value, tb):
    import traceback
    say("".join(traceback.format_exception(kind, value, tb)))
    sys.__stdout__.flush()
    os._exit(1)


sys.excepthook = excepthook  # tracebacks would otherwise vanish into the captured messages

LoadPlugin(plugin, remote=False, ns=globals())
check("AssignRockProperties" in globals() and "SimulateCooling" in globals(),
      "plugin loaded: Assign Rock Properties, Simulate Cooling")


def local(proxy):
    """The VTK data object a proxy produced (builtin session: same process)."""
    return proxy.GetClientSideObject().GetOutputDataObject(0)


def model(mesh_file, library="rocks.yaml"):
    reader = XMLUnstructuredGridReader(FileName=[os.path.join(fixture, mesh_file)])
    rocks = AssignRockProperties(Input=reader)
    rocks.RegionArray = ["CELLS", "RegionId"]
    rocks.RockLibraryFile = os.path.join(fixture, library)
    rocks.RegionMapFile = os.path.join(fixture, "regions.yaml")
    return reader, rocks


# --- the main path -------------------------------------------------------------------------
reader, rocks = model("fixture.vtu")
rocks.UpdatePipeline()
grid = local(rocks)
check(grid.GetNumberOfCells() == 12 * 12 * 16, "rock properties assigned to every cell")
check(grid.GetCellData().GetArray("Density_kg_per_m3") is not None, "property arrays carry units in their names")

sim = SimulateCooling(Input=rocks)
times = [1.0, 3.0, 10.0, 30.0, 100.0]  # the same list as in make_fixture.cpp
sim.SetPropertyWithName("OutputSchedule", 1)
sim.SetPropertyWithName("OutputTimes", times)
sim.SetPropertyWithName("Integrator", 1)  # forward Euler, as in the fixture's core run
sim.UpdatePipelineInformation()
published = list(sim.TimestepValues)
check(published == times, "published time steps %s" % published)

with open(os.path.join(fixture, "reference.csv")) as f:
    rows = list(csv.reader(f))[1:]
worst = 0.0
for k, t in enumerate(times):
    sim.UpdatePipeline(t)
    out = local(sim)
    T = out.GetPointData().GetArray("Temperature")
    check(out.GetFieldData().GetArray("TimeYears").GetValue(0) == t, "output at t = %g yr" % t)
    for row in rows:
        worst = max(worst, abs(T.GetValue(int(row[0])) - float(row[4 + k])))
check(worst <= 1e-9, "probe temperatures equal the core's run to round-off (max |dT| = %.3g K)" % worst)
sim.UpdatePropertyInformation()
solves = sim.GetProperty("SolveCount").GetElement(0)
for t in reversed(times):
    sim.UpdatePipeline(t)
sim.UpdatePropertyInformation()
check(solves == 1 and sim.GetProperty("SolveCount").GetElement(0) == 1,
      "scrubbing back through time does not solve again (solves: %d)" % sim.GetProperty("SolveCount").GetElement(0))
out = local(sim)
peak, T = out.GetPointData().GetArray("PeakTemperature"), out.GetPointData().GetArray("Temperature")
check(peak is not None and all(peak.GetValue(i) >= T.GetValue(i) - 1e-9 for i in range(T.GetNumberOfTuples())),
      "PeakTemperature is published and never below the current temperature")
table = sim.GetClientSideObject().GetOutputDataObject(1)
check(table.GetNumberOfRows() == len(times) and table.GetColumnByName("Early sill: ContactTemperature_C") is not None
      and table.GetColumnByName("Early sill: ContactDistance_m") is not None,
      "body summary table: one row per output time, per-body columns")
ledger = local(sim).GetFieldData().GetArray("EnergyLedger_J")
check(abs(ledger.GetComponent(0, 5)) <= 1e-9 * abs(ledger.GetComponent(0, 0)),
      "energy ledger closes (imbalance %.3g J)" % ledger.GetComponent(0, 5))

# The viewer's own filters on the output.
contour = Contour(Input=sim, ContourBy=["POINTS", "Temperature"], Isosurfaces=[300.0])
contour.UpdatePipeline(10.0)
check(local(contour).GetNumberOfCells() > 0, "viewer's Contour at 300 °C gives a surface at 10 yr")
slc = Slice(Input=sim)
slc.SliceType.Normal = [0, 1, 0]
slc.UpdatePipeline(10.0)
check(local(slc).GetNumberOfCells() > 0, "viewer's Slice cuts the output")

iso = IsothermSurfaces(Input=sim)
iso.SetPropertyWithName("Isotherms", [200.0, 500.0])
iso.UpdatePipeline(3.0)
labels = local(iso).GetCellData().GetArray("Isotherm")
check(labels is not None and {labels.GetValue(i) for i in range(labels.GetNumberOfTuples())} == {200.0, 500.0},
      "isotherm surfaces labelled 200 and 500 °C")

depth_map = IsothermDepthMap(Input=sim)
depth_map.SetPropertyWithName("Isotherm", 14.0)
depth_map.SetPropertyWithName("Resolution", [21, 21])
depth_map.UpdatePipeline(1.0)
dm = local(depth_map)
d_corner = dm.GetPointData().GetArray("IsothermDepth_m").GetValue(0)
expected = (14.0 - 10.0) / 0.030  # linear geotherm; far from the bodies after 1 yr
check(abs(d_corner - expected) < 0.5, "depth to 14 °C at the model corner %.2f m (geotherm: %.2f m)" % (d_corner, expected))

# A picture: cut-away coloured by temperature with the isotherms.
view = GetActiveViewOrCreate("RenderView")
view.ViewSize = [800, 600]
view.ViewTime = 10.0
clip = Clip(Input=sim)
clip.ClipType.Normal = [0, 1, 0]
display = Show(clip, view)
ColorBy(display, ("POINTS", "Temperature"))
display.RescaleTransferFunctionToDataRange(True)
display.SetScalarBarVisibility(view, True)
GetScalarBar(GetColorTransferFunction("Temperature"), view).ComponentTitle = "[°C]"
iso_clip = Clip(Input=iso)  # the same cut-away for the isotherm surfaces
iso_clip.ClipType.Normal = [0, 1, 0]
Show(iso_clip, view)
view.CameraPosition = [350, 500, 150]  # looking at the cut face (the y < 0 half is kept)
view.CameraFocalPoint = [0, 0, -100]
view.CameraViewUp = [0, 0, 1]
Render(view)
shot = os.path.join(outdir, "plugin_cutaway.png")
SaveScreenshot(shot, view, ImageResolution=[800, 600])
from vtkmodules.vtkIOImage import vtkPNGReader  # noqa: E402
png = vtkPNGReader()
png.SetFileName(shot)
png.Update()
pixels = png.GetOutput().GetPointData().GetScalars()
colours = {tuple(int(c) for c in pixels.GetTuple(i)[:3]) for i in range(0, pixels.GetNumberOfTuples(), 7)}
check(len(colours) > 50, "screenshot %s is not blank (%d distinct colours)" % (shot, len(colours)))

# The viewer's one-click briefing layout (the macro the plugin ships) on the simulation output.
briefing_view = CreateView("RenderView")
briefing_view.ViewSize = [960, 540]
SetActiveView(briefing_view)
SetActiveSource(sim)
macro = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "plugin", "python",
                     "EmberlithBriefingView.py")
exec(compile(open(macro).read(), macro, "exec"), {"__name__": "__main__"})
briefing_view.ViewTime = 10.0
Render(briefing_view)
shot = os.path.join(outdir, "briefing_macro.png")
SaveScreenshot(shot, briefing_view, ImageResolution=[960, 540])
png.SetFileName(shot)
png.Modified()
png.Update()
pixels = png.GetOutput().GetPointData().GetScalars()
colours = {tuple(int(c) for c in pixels.GetTuple(i)[:3]) for i in range(0, pixels.GetNumberOfTuples(), 7)}
check(len(colours) > 50, "briefing macro lays out a picture %s (%d colours)" % (shot, len(colours)))

# The log-spaced schedule: 20 times from 1 to 1000 yr by default.
sim2 = SimulateCooling(Input=rocks)
sim2.UpdatePipelineInformation()
steps = list(sim2.TimestepValues)
check(len(steps) == 20 and math.isclose(steps[0], 1.0) and steps[-1] == 1000.0,
      "default schedule: 20 log-spaced times from 1 to 1000 yr")

# --- failure paths: a message naming the problem, no output, no crash ----------------------
def failure(mesh_file, library, expect, what):
    start = len(messages.GetOutput())
    _, bad = model(mesh_file, library)
    bad.UpdatePipeline()
    text = messages.GetOutput()[start:]
    ours = [line for line in text.splitlines() if expect in line]
    check(expect in text and local(bad).GetNumberOfCells() == 0,
          what + " (message: %s)" % (ours[0].split("|", 1)[-1].strip() if ours else "none"))


failure("bad_2d.vtu", "rocks.yaml", "not linear 3-D cells", "mesh of triangles is refused")
failure("no_region.vtu", "rocks.yaml", "no cell array 'RegionId'", "missing region array is refused")
failure("fixture.vtu", "missing-rocks.yaml", "cannot open the file", "unreadable property file is refused")

say("%d checks failed" % len(failures) if failures else "all plugin checks passed")
# pvbatch's own exit status counts the errors the failure paths logged on purpose; ours is the verdict.
os._exit(1 if failures else 0)
