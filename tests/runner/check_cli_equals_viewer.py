"""The runner and the viewer give identical numbers: rebuild the runner's model in pvbatch from
the files it saved (model/mesh.vtu, rocks.yaml, regions.yaml), apply the plugin's filters with
the scenario's settings, and compare Temperature and PeakTemperature at every output time with
the runner's frames (bitwise: same code path, deterministic solver).

Usage: pvbatch check_cli_equals_viewer.py PLUGIN RESULT_FOLDER
"""
import json
import os
import sys

from paraview.simple import *  # noqa: F401,F403

plugin, result = sys.argv[1], sys.argv[2]
LoadPlugin(plugin, remote=False, ns=globals())
with open(os.path.join(result, "provenance.json")) as f:
    provenance = json.load(f)
times = [fr["time_yr"] for fr in provenance["frames"]]
mesh = XMLUnstructuredGridReader(FileName=[os.path.join(result, "model", "mesh.vtu")])
rocks = AssignRockProperties(Input=mesh)
rocks.RockLibraryFile = os.path.join(result, "model", "rocks.yaml")
rocks.RegionMapFile = os.path.join(result, "model", "regions.yaml")
sim = SimulateCooling(Input=rocks)
# tests/runner/tiny_sill.yaml: geotherm 10 °C + 30 K/km, top held at 10 °C, 60 mW/m² at the
# base, insulated sides, RKL2 (the panel's defaults, set here explicitly).
for name, value in [("InitialState", 1), ("SurfaceTemperature", 10.0), ("Gradient", 30.0),
                    ("TopCondition", 1), ("TopTemperature", 10.0), ("BottomCondition", 2),
                    ("BottomHeatFlow", 60.0), ("SidesCondition", 0), ("Integrator", 0),
                    ("OutputSchedule", 1), ("OutputTimes", times), ("Thresholds", [100.0])]:
    sim.SetPropertyWithName(name, value)
worst = 0.0
from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader  # noqa: E402
for frame in provenance["frames"]:
    sim.UpdatePipeline(frame["time_yr"])
    mine = sim.GetClientSideObject().GetOutputDataObject(0).GetPointData()
    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(os.path.join(result, frame["file"]))
    reader.Update()
    theirs = reader.GetOutput().GetPointData()
    for array in ("Temperature", "PeakTemperature"):
        a, b = mine.GetArray(array), theirs.GetArray(array)
        for i in range(a.GetNumberOfTuples()):
            worst = max(worst, abs(a.GetValue(i) - b.GetValue(i)))
ok = worst == 0.0
sys.__stdout__.write("%s CLI and viewer agree over %d output times (max difference %g K)\n"
                     % ("ok  " if ok else "FAIL", len(times), worst))
sys.__stdout__.flush()
os._exit(0 if ok else 1)
