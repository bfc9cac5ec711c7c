"""screen_doc.py - the screening JSON of a report set read back for the end-to-end checks: the
summary document and the plant records of the JSON Lines file it names (plants_file), each record
expanded to every member (the file leaves out members that are null or false, requirements equal
to the summary's requirement_defaults, and targets that do not apply), every root as [re, im],
and given the older nested names the checks use (source, band_curve.band_edge, time_to_double
items)."""
import json
import os

TARGETS = ("unstable_pole", "rhp_zero", "delay", "rolloff_start", "band_edge", "effort_allowed",
           "sample_rate", "compute_delay")
FLOORS = ("bode_area", "ms", "mt", "ms_interpolation", "mt_interpolation", "ms_band", "ms_poisson",
          "mt_poisson", "effort", "ms_nyquist", "condition_estimate")


def read_records(summary_path):
    """The summary and the raw records; the file must end every line with LF, one record a line."""
    doc = json.load(open(summary_path, encoding="utf-8"))
    path = os.path.join(os.path.dirname(summary_path), doc["plants_file"])
    text = open(path, encoding="utf-8").read()
    assert text == "" or text.endswith("\n"), "the last record has no line end"
    lines = text.split("\n")[:-1]
    assert len(lines) == doc["plants_count"], (len(lines), doc["plants_count"])
    return doc, [json.loads(line) for line in lines]


def expand(doc, r):
    p = dict(r)
    p["source"] = {"file": r["file"], "line": r["line"]}
    # Beyond rank, id, verdict, severity, file, line and note, a top-level
    # member is left out when null or false.
    for k in ("shares", "worst", "cause", "plant", "requirements", "floors", "sampling", "attribution",
              "targets", "band_curve"):
        p.setdefault(k, None)
        r = dict(r, **{k: r.get(k)})
    p.setdefault("severity_infinite", False)
    p.setdefault("unstable_controller_required", None if r["verdict"] == "input-error" else False)
    if r["verdict"] == "input-error":
        for k in ("shares", "worst", "cause", "plant", "requirements", "floors", "sampling",
                  "attribution", "targets", "band_curve"):
            p[k] = None
        return p
    p["error"] = None
    # A real root is written as its number, a complex one as [re, im]: every root as [re, im].
    pl = dict(r["plant"])
    for k in ("poles", "zeros"):
        pl[k] = [[z, 0.0] if isinstance(z, (int, float)) else z for z in pl.get(k, [])]
    p["plant"] = pl
    p["shares"] = {k: r["shares"].get(k) for k in ("ms", "mt", "effort")}
    q = dict(doc["requirement_defaults"])
    q.update(r["requirements"])
    p["requirements"] = q
    f = dict(r["floors"])
    for k in FLOORS:
        f.setdefault(k, None)
    f.setdefault("infinite", False)
    f.setdefault("reasons", {})
    w = f.setdefault("window", {})
    for k in ("crossover_min", "crossover_max"):
        w.setdefault(k, None)
    w.setdefault("open", False)
    f["time_to_double"] = [{"pole": a, "imag": b, "seconds": c} for a, b, c in f.get("time_to_double", [])]
    p["floors"] = f
    a = dict(r["attribution"])
    for k in ("floor", "allowed", "all_relaxed"):
        a.setdefault(k, None)
    a["factors"] = [dict({"floor_without": None, "lowers": False}, **x) for x in a["factors"]]
    p["attribution"] = a
    t = {}
    for k in TARGETS:
        t[k] = dict({"state": "not-applicable", "now": None, "limit": None, "searched_to": None,
                     "passes_now": False, "why": None}, **r["targets"].get(k, {}))
    p["targets"] = t
    b = r["band_curve"]
    if b is not None:
        n, lo, hi = b["points"], b["band_edge_from"], b["band_edge_to"]
        b = dict(b, band_edge=[lo * (hi / lo) ** (i / (n - 1)) if n > 1 else lo for i in range(n)])
    p["band_curve"] = b
    return p


def load(summary_path):
    """The summary with "plants": every record, expanded, in rank order."""
    doc, recs = read_records(summary_path)
    doc = dict(doc)
    doc["plants"] = [expand(doc, r) for r in recs]
    return doc


def target_line(txt, plant_id, start):
    """The item of the text report (.txt) that begins with `start` in the section of plant_id, its
    wrapped continuation lines joined."""
    lines = txt.split("\n")
    for i, line in enumerate(lines):
        if not line.startswith("  " + plant_id + "  ["):
            continue
        items = []
        for follow in lines[i + 1:]:
            if not follow.startswith("    "):
                break
            if follow.startswith("      ") and items:
                items[-1] += " " + follow.strip()
            else:
                items.append(follow.strip().removeprefix("- "))
        for body in items:
            if body.startswith(start):
                return body
    raise AssertionError("no line '%s...' under %s" % (start, plant_id))
