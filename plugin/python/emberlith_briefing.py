"""Briefing pictures of an Emberlith result: cooling movie, poster frame and cooling curves.

One code path for the runner (`emberlith brief RESULT`, which starts this script in pvbatch,
under Xvfb when there is no display) and for the viewer (the plugin's macro calls
`lay_out_briefing_view` on the active simulation output).

Run directly:  pvbatch emberlith_briefing.py RESULT_FOLDER [options]   (see --help)
"""
import argparse
import json
import math
import os
import shutil
import subprocess
import sys

CAUTION = ("Model estimate from uncertain inputs - not a basis for site-access, drilling or well "
           "decisions; follow local authorities and licensed professionals.")
# Perceptually uniform and readable with colour-vision deficiencies; dark blue = cold, yellow = hot.
COLOUR_MAP = "Plasma (matplotlib)"
TEXT_COLOUR = [0.1, 0.1, 0.1]
BACKGROUND = [1.0, 1.0, 1.0]
SECONDS_PER_YEAR = 365.25 * 86400.0


def natural_time(years):
    """Elapsed time in the unit a reader expects: days, years, kyr, Myr."""
    if years < 60.0 / 365.25:
        return "%.3g days" % (years * 365.25)
    if years < 1e3:
        return "%.3g years" % years
    if years < 1e6:
        return "%.3g kyr" % (years / 1e3)
    return "%.3g Myr" % (years / 1e6)


def default_isotherms(t_min, t_max):
    """Three to four round temperatures spread over (t_min, t_max) (°C); t_min is the warmest
    background (the model base before any body), so the shells show the bodies' heat, not the
    geotherm's flat isotherms."""
    candidates = [50, 100, 150, 200, 300, 400, 500, 600, 700, 800, 900, 1000, 1100]
    inside = [c for c in candidates if t_min + 0.05 * (t_max - t_min) < c < t_max - 0.05 * (t_max - t_min)]
    if len(inside) <= 4:
        return inside
    step = len(inside) / 4.0
    return [inside[int(i * step)] for i in range(4)]


def nice_length(width):
    """A round scale-bar length about a quarter of the model width (m)."""
    target = width / 4.0
    power = 10 ** math.floor(math.log10(target))
    for factor in (5, 2, 1):
        if factor * power <= target:
            return factor * power
    return power


def lay_out_briefing_view(source, view, isotherms=None, cut="half", title="", temperature_range=None,
                          live_clock=False, background=None):
    """Cut-away coloured by temperature, labelled isotherms, legend, time, title, scale bar and
    caution in `view`. Returns the text source that shows the time (update it per frame), or,
    with live_clock (the viewer's animation), an annotation that follows the view's time."""
    from paraview import simple as pv

    info = source.GetDataInformation()
    b = info.GetBounds()
    centre = [(b[0] + b[1]) / 2, (b[2] + b[3]) / 2, (b[4] + b[5]) / 2]
    width = max(b[1] - b[0], b[3] - b[2], b[5] - b[4])
    if temperature_range is None:
        temperature_range = source.PointData["Temperature"].GetRange()
    t_min, t_max = temperature_range
    if isotherms is None:
        isotherms = default_isotherms(background if background is not None else t_min, t_max)

    if cut == "quadrant":
        clip = pv.Clip(Input=source, ClipType="Box")
        clip.ClipType.Position = [centre[0], centre[1], b[4] - width]
        clip.ClipType.Length = [2 * width, 2 * width, 4 * width]
        clip.Invert = 0  # remove the quadrant x > centre, y > centre
    elif cut == "half":
        clip = pv.Clip(Input=source, ClipType="Plane")
        clip.ClipType.Origin = centre
        clip.ClipType.Normal = [0, 1, 0]  # keep y < centre; the cut face looks to +y
    else:
        clip = source
    if clip is not source:
        clip.Scalars = ["POINTS", "Temperature"]

    body = pv.Show(clip, view)
    pv.ColorBy(body, ("POINTS", "Temperature"))
    if isotherms:
        # The isotherm shells stand in the removed part, beside the cut face they meet.
        contour = pv.Contour(Input=source, ContourBy=["POINTS", "Temperature"], Isosurfaces=list(isotherms))
        contour.ComputeScalars = 1
        shells = contour
        if clip is not source:
            shells = pv.Clip(Input=contour, ClipType="Plane")
            if cut == "half":
                shells.ClipType.Origin = centre
                shells.ClipType.Normal = [0, 1, 0]
                shells.Invert = 0
            else:
                shells = pv.Clip(Input=contour, ClipType="Box")
                shells.ClipType.Position = [centre[0], centre[1], b[4] - width]
                shells.ClipType.Length = [2 * width, 2 * width, 4 * width]
                shells.Invert = 1
        surfaces = pv.Show(shells, view)
        pv.ColorBy(surfaces, ("POINTS", "Temperature"))
        surfaces.Opacity = 0.3
    lut = pv.GetColorTransferFunction("Temperature")
    lut.ApplyPreset(COLOUR_MAP, True)
    lut.AutomaticRescaleRangeMode = "Never"
    lut.RescaleTransferFunction(t_min, t_max)
    # Each isotherm is coloured by its own temperature and marked on the legend: its label.
    lut.Annotations = sum([[repr(float(v)), "%g °C" % v] for v in isotherms], [])
    bar = pv.GetScalarBar(lut, view)
    bar.Title = "Temperature"
    bar.ComponentTitle = "[°C]"
    bar.DrawAnnotations = 1
    bar.TitleColor = TEXT_COLOUR
    bar.LabelColor = TEXT_COLOUR
    bar.Visibility = 1
    bar.WindowLocation = "Any Location"
    bar.Position = [0.89, 0.15]
    bar.ScalarBarLength = 0.6
    bar.AutomaticLabelFormat = 0
    bar.LabelFormat = "%.0f"
    bar.RangeLabelFormat = "%.0f"

    def text(value, location, size):
        t = pv.Text(Text=value)
        d = pv.Show(t, view)
        d.WindowLocation = location
        d.FontSize = size
        d.Color = TEXT_COLOUR
        return t

    text((title or "Cooling of the intrusions") + "\nCut-away view, no vertical exaggeration", "Upper Center", 18)
    if live_clock:
        clock = pv.AnnotateTime(Format="Elapsed: {time:.4g} years")
        d = pv.Show(clock, view)
        d.WindowLocation = "Upper Left Corner"
        d.FontSize = 18
        d.Color = TEXT_COLOUR
    else:
        clock = text("", "Upper Left Corner", 18)
    text(CAUTION, "Lower Left Corner", 10)

    length = nice_length(b[1] - b[0])
    # Scale bar along the top edge of the cut face.
    ruler = pv.Ruler(Point1=[b[0], centre[1], b[5]], Point2=[b[0] + length, centre[1], b[5]])
    ruler_display = pv.Show(ruler, view)
    ruler_display.LabelFormat = "%-#.4g m"
    ruler_display.Color = TEXT_COLOUR

    view.OrientationAxesVisibility = 0
    view.UseColorPaletteForBackground = 0
    view.Background = BACKGROUND
    view.CameraFocalPoint = centre
    view.CameraPosition = [centre[0] + 1.1 * width, centre[1] + 1.6 * width, centre[2] + 0.9 * width]
    view.CameraViewUp = [0, 0, 1]
    view.ResetCamera(False)
    view.CameraParallelProjection = 0
    return clock


def base_temperature(frame_file):
    """Warmest temperature on the model's base at the first output: the background's top."""
    from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

    reader = vtkXMLUnstructuredGridReader()
    reader.SetFileName(frame_file)
    reader.Update()
    grid = reader.GetOutput()
    z_min = grid.GetBounds()[4]
    T = grid.GetPointData().GetArray("Temperature")
    tol = 1e-6 * max(1.0, abs(z_min))
    return max(T.GetValue(i) for i in range(grid.GetNumberOfPoints()) if grid.GetPoint(i)[2] <= z_min + tol)


def probe_series(frames, folder, probes):
    """Temperature at each probe's nearest node, and mean melt fraction per body, per frame."""
    from vtkmodules.vtkCommonDataModel import vtkPointLocator
    from vtkmodules.vtkIOXML import vtkXMLUnstructuredGridReader

    temperature = {p["label"]: [] for p in probes}
    melt = {}
    nodes, body_nodes = None, None
    for frame in frames:
        reader = vtkXMLUnstructuredGridReader()
        reader.SetFileName(os.path.join(folder, frame["file"]))
        reader.Update()
        grid = reader.GetOutput()
        if nodes is None:
            locator = vtkPointLocator()
            locator.SetDataSet(grid)
            locator.BuildLocator()
            nodes = {p["label"]: locator.FindClosestPoint(p["point"]) for p in probes}
            region = grid.GetCellData().GetArray("RegionId")
            body_nodes = {}
            for p in probes:
                if p.get("region") is None:
                    continue
                ids = set()
                for c in range(grid.GetNumberOfCells()):
                    if int(region.GetValue(c)) == p["region"]:
                        cell_ids = grid.GetCell(c).GetPointIds()
                        ids.update(cell_ids.GetId(i) for i in range(cell_ids.GetNumberOfIds()))
                body_nodes[p["body"]] = sorted(ids)
        T = grid.GetPointData().GetArray("Temperature")
        f = grid.GetPointData().GetArray("MeltFraction")
        for label, node in nodes.items():
            temperature[label].append(T.GetValue(node))
        for name, ids in body_nodes.items():
            melt.setdefault(name, []).append(sum(f.GetValue(i) for i in ids) / max(1, len(ids)))
    return temperature, melt


def cooling_curves(times, temperature, melt, path, title):
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, (top, bottom) = plt.subplots(2, 1, figsize=(12, 9), dpi=100, sharex=True)
    log = times[0] > 0 and times[-1] / times[0] > 50  # log time where the range calls for it
    for label, values in temperature.items():
        top.plot(times, values, marker="o", markersize=3, label=label)
    top.set_ylabel("Temperature [°C]")
    top.set_title(title or "Cooling curves")
    top.grid(True, which="both", alpha=0.3)
    top.legend(fontsize=9)
    for name, values in melt.items():
        bottom.plot(times, values, marker="o", markersize=3, label=name)
    bottom.set_ylabel("Mean melt fraction of the body")
    bottom.set_ylim(-0.02, 1.02)
    bottom.set_xlabel("Time since the model start [years]")
    bottom.grid(True, which="both", alpha=0.3)
    if melt:
        bottom.legend(fontsize=9)
    if log:
        bottom.set_xscale("log")
    fig.text(0.5, 0.01, CAUTION, ha="center", fontsize=8)
    fig.savefig(path)
    plt.close(fig)


def make_briefing(folder, out, isotherms=None, cut="half", size=(1280, 720), fps=6, title="",
                  poster_time=None):
    from paraview import simple as pv

    with open(os.path.join(folder, "provenance.json")) as f:
        provenance = json.load(f)
    frames = provenance["frames"]
    times = [fr["time_yr"] for fr in frames]
    bodies = provenance.get("bodies", [])
    os.makedirs(os.path.join(out, "frames"), exist_ok=True)

    reader = pv.PVDReader(FileName=os.path.join(folder, "temperature.pvd"))
    reader.UpdatePipelineInformation()
    background = base_temperature(os.path.join(folder, frames[0]["file"]))
    t_min, t_max = math.inf, -math.inf
    for t in times:
        reader.UpdatePipeline(t)
        lo, hi = reader.PointData["Temperature"].GetRange()
        t_min, t_max = min(t_min, lo), max(t_max, hi)
    view = pv.CreateView("RenderView")
    view.ViewSize = list(size)
    clock = lay_out_briefing_view(reader, view, isotherms, cut, title, (t_min, t_max), background=background)

    for k, t in enumerate(times):
        view.ViewTime = t
        clock.Text = "Elapsed: " + natural_time(t)
        pv.SaveScreenshot(os.path.join(out, "frames", "frame_%04d.png" % k), view, ImageResolution=list(size))

    movie = os.path.join(out, "cooling.mp4")
    ffmpeg = shutil.which("ffmpeg")
    if ffmpeg:
        subprocess.run([ffmpeg, "-loglevel", "error", "-y", "-framerate", str(fps), "-i",
                        os.path.join(out, "frames", "frame_%04d.png"), "-c:v", "libx264",
                        "-pix_fmt", "yuv420p", "-vf", "pad=ceil(iw/2)*2:ceil(ih/2)*2", movie], check=True)
    else:
        movie = None

    # Poster: the asked time, else when the largest body has just solidified, else the last frame.
    if poster_time is None:
        largest = max(bodies, key=lambda b: b.get("volume_m3", 0), default=None)
        solid = largest.get("solidified_yr") if largest else None
        poster_time = min((t for t in times if solid is not None and t >= solid), default=times[-1])
    view.ViewTime = poster_time
    clock.Text = "Elapsed: " + natural_time(poster_time)
    poster = os.path.join(out, "poster.png")
    pv.SaveScreenshot(poster, view, ImageResolution=[1920, 1080])

    probes = []
    for b in bodies:
        for kind in ("centre", "contact", "aureole"):
            if kind in b.get("probes", {}):
                probes.append({"label": "%s: %s" % (b["name"], kind), "point": b["probes"][kind],
                               "region": b["region"] if kind == "centre" else None, "body": b["name"]})
    temperature, melt = probe_series(frames, folder, probes)
    curves = os.path.join(out, "cooling_curves.png")
    cooling_curves(times, temperature, melt, curves, title)
    return {"movie": movie, "poster": poster, "curves": curves, "frames": len(times)}


def main(argv):
    parser = argparse.ArgumentParser(description="Briefing pictures of an Emberlith result folder.")
    parser.add_argument("folder")
    parser.add_argument("--output", help="where to put them (default: FOLDER/briefing)")
    parser.add_argument("--isotherms", help="comma-separated temperatures in °C (default: chosen from the run)")
    parser.add_argument("--cut", choices=["half", "quadrant", "none"], default="half")
    parser.add_argument("--size", default="1280x720", help="frame size WxH in pixels")
    parser.add_argument("--fps", type=float, default=6.0, help="movie frames per second")
    parser.add_argument("--title", default="")
    parser.add_argument("--poster-time", type=float, help="years (default: when the largest body has solidified)")
    args = parser.parse_args(argv)
    out = args.output or os.path.join(args.folder, "briefing")
    isotherms = [float(v) for v in args.isotherms.split(",")] if args.isotherms else None
    width, height = (int(v) for v in args.size.lower().split("x"))
    made = make_briefing(args.folder, out, isotherms, args.cut, (width, height), args.fps, args.title,
                         args.poster_time)
    sys.__stdout__.write(json.dumps(made) + "\n")


if __name__ == "__main__":
    main(sys.argv[1:])
