"""Emberlith: lay out the briefing view on the active cooling-simulation output.

Import as a macro (Macros > Import new macro...), select the output of Simulate Cooling (or a
result's temperature.pvd), click the macro, then press Play. The same layout as
`emberlith brief`: cut-away coloured by temperature, labelled isotherms, legend in °C, elapsed
time, title, scale bar and the model-estimate caution. Needs the Emberlith plugin loaded.
"""
import os
import sys

from paraview import servermanager
from paraview.simple import GetActiveSource, GetActiveViewOrCreate, Render


def _briefing_module():
    """emberlith_briefing.py lives in share/emberlith, four levels above the loaded plugin
    (PREFIX/lib/paraview-5.11/plugins/Emberlith/Emberlith.so; the build tree is laid out alike)."""
    info = servermanager.vtkSMProxyManager.GetProxyManager().GetPluginManager().GetLocalInformation()
    for i in range(info.GetNumberOfPlugins()):
        if info.GetPluginName(i) == "Emberlith" and info.GetPluginLoaded(i):
            share = os.path.join(os.path.dirname(info.GetPluginFileName(i)), *[".."] * 4, "share", "emberlith")
            if os.path.isdir(share) and share not in sys.path:
                sys.path.insert(0, share)
    import emberlith_briefing
    return emberlith_briefing


emberlith_briefing = _briefing_module()

source = GetActiveSource()
if source is None or "Temperature" not in source.PointData.keys():
    raise RuntimeError("select the output of Simulate Cooling (it has the point array Temperature) first")
view = GetActiveViewOrCreate("RenderView")
emberlith_briefing.lay_out_briefing_view(source, view, live_clock=True)
Render(view)
