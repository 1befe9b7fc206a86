"""A plugin (the installed one, or the build's) loads and cools a mesh with its property files.

Usage: pvbatch check_installed.py PLUGIN MESH ROCK_LIBRARY REGION_MAP
"""
import os
import sys

from paraview.simple import *  # noqa: F401,F403

plugin, mesh, library, regions = sys.argv[1:5]
LoadPlugin(plugin, remote=False, ns=globals())
reader = XMLUnstructuredGridReader(FileName=[mesh])
rocks = AssignRockProperties(Input=reader)
rocks.RockLibraryFile = library
rocks.RegionMapFile = regions
sim = SimulateCooling(Input=rocks)
sim.SetPropertyWithName("OutputSchedule", 1)
sim.SetPropertyWithName("OutputTimes", [0.5])
sim.UpdatePipeline(0.5)
T = sim.GetClientSideObject().GetOutputDataObject(0).GetPointData().GetArray("Temperature")
ok = T is not None and T.GetRange()[1] > 1000.0
sys.__stdout__.write("%s plugin %s cooled %s (max T %s)\n" % ("ok  " if ok else "FAIL", plugin, mesh, T.GetRange()[1] if T else None))
sys.__stdout__.flush()
os._exit(0 if ok else 1)
