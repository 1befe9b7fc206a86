"""The plugin loads from an installed location (cmake --install) and runs.

Usage: pvbatch check_installed.py INSTALLED_PLUGIN FIXTURE_DIR
"""
import os
import sys

from paraview.simple import *  # noqa: F401,F403

plugin, fixture = sys.argv[1], sys.argv[2]
LoadPlugin(plugin, remote=False, ns=globals())
reader = XMLUnstructuredGridReader(FileName=[os.path.join(fixture, "fixture.vtu")])
rocks = AssignRockProperties(Input=reader)
rocks.RockLibraryFile = os.path.join(fixture, "rocks.yaml")
rocks.RegionMapFile = os.path.join(fixture, "regions.yaml")
sim = SimulateCooling(Input=rocks)
sim.SetPropertyWithName("OutputSchedule", 1)
sim.SetPropertyWithName("OutputTimes", [0.5])
sim.UpdatePipeline(0.5)
T = sim.GetClientSideObject().GetOutputDataObject(0).GetPointData().GetArray("Temperature")
ok = T is not None and T.GetRange()[1] > 1000.0
sys.__stdout__.write("%s installed plugin %s ran (max T %s)\n" % ("ok  " if ok else "FAIL", plugin, T.GetRange()[1] if T else None))
sys.__stdout__.flush()
os._exit(0 if ok else 1)
