"""Independent reader check of gatehold sweep files with h5py.

Usage: python3 h5py_check.py FILE.h5 [FILE.h5 ...]
Exit 0 and one JSON object per file on stdout when every structural rule of
docs/hdf5-schema.md holds; exit 1 with the broken rule on stderr otherwise;
exit 77 when h5py is not importable.
"""
import json
import math
import sys

try:
    import h5py
    import numpy as np
except ImportError as e:  # the Rust test decides whether this is a skip
    print(f"h5py not importable: {e}", file=sys.stderr)
    sys.exit(77)


def fail(path, msg):
    print(f"{path}: {msg}", file=sys.stderr)
    sys.exit(1)


def text(v):
    return v.decode() if isinstance(v, (bytes, np.bytes_)) else str(v)


def check(path):
    f = h5py.File(path, "r")
    for a in ["format", "tool_version", "plan", "created", "command_line", "model_summary",
              "started", "finished", "shard", "points_total", "axis_columns", "figure_columns"]:
        if a not in f.attrs:
            fail(path, f"root attribute {a} missing")
    fmt = text(f.attrs["format"])
    if fmt not in ("gatehold-sweep 1", "gatehold-sweep 2"):
        fail(path, f"format attribute {fmt}")
    v2 = fmt == "gatehold-sweep 2"
    if v2:
        for a in ["base_device", "inputs"]:
            if a not in f.attrs:
                fail(path, f"root attribute {a} missing (format 2)")
        inputs = json.loads(text(f.attrs["inputs"]))
        for rec in inputs:
            if set(rec) != {"role", "file", "sha256"} or len(rec["sha256"]) != 64:
                fail(path, f"inputs record {rec}")

        # Format 2: every dataset anywhere carries units and a description.
        def visit(name, obj):
            if isinstance(obj, h5py.Dataset):
                for a in ["units", "description"]:
                    if a not in obj.attrs or not text(obj.attrs[a]):
                        fail(path, f"{name} has no {a} attribute")
        f.visititems(visit)
    axes = json.loads(text(f.attrs["axis_columns"]))
    figures = json.loads(text(f.attrs["figure_columns"]))
    pts = f["points"]
    n = pts["point_index"].shape[0]
    for name, ds in pts.items():
        if ds.ndim != 1 or ds.shape[0] != n:
            fail(path, f"points/{name} shape {ds.shape}, expected ({n},)")
        if "units" not in ds.attrs:
            fail(path, f"points/{name} has no units attribute")
        if ds.maxshape != (None,):
            fail(path, f"points/{name} is not appendable (maxshape {ds.maxshape})")
    for k in axes + figures + ["status", "curve_offset", "curve_length", "meets_criteria"] + (
            ["method", "warnings"] if v2 else []):
        if k not in pts:
            fail(path, f"points/{k} missing")
    if v2:
        # Statuses, methods and warnings are variable-length strings (stored whole).
        for k in ["status", "method", "warnings"]:
            info = h5py.check_string_dtype(pts[k].dtype)
            if info is None or info.length is not None:
                fail(path, f"points/{k} is not a variable-length string dataset ({pts[k].dtype})")
    idx = pts["point_index"][:].tolist()
    if idx != sorted(idx) or len(set(idx)) != len(idx):
        fail(path, "point_index not strictly increasing")
    complete = int(f.attrs["complete"])
    if complete and idx != list(range(int(f.attrs["points_total"]))) and text(f.attrs["shard"]) == "0/1":
        fail(path, "complete unsharded file is not one element per point in plan order")
    status = [text(s).rstrip("\x00 ") for s in pts["status"][:]]
    cur = f["curves"]
    total = cur["vgs_V"].shape[0]
    for name in ["vgs_V", "id_lin_A_per_um", "id_sat_A_per_um", "point_index"]:
        if cur[name].shape != (total,) or "units" not in cur[name].attrs:
            fail(path, f"curves/{name} shape or units")
    off, ln, cpi = pts["curve_offset"][:], pts["curve_length"][:], cur["point_index"][:]
    for k in range(n):
        if not np.all(cpi[off[k]:off[k] + ln[k]] == idx[k]):
            fail(path, f"curve slice of point {idx[k]} holds other points")
    maps = {}
    for g in f["maps"]:
        m = f["maps"][g]
        nx, ny = m["x_nm"].shape[0], m["y_nm"].shape[0]
        if m["material_code"].shape != (ny - 1, nx - 1):
            fail(path, f"maps/{g}/material_code shape")
        for p in ["psi_lin_V", "psi_sat_V"]:
            if p in m and m[p].shape != (ny, nx):
                fail(path, f"maps/{g}/{p} shape")
        maps[g] = [nx, ny, float(np.nanmax(m["psi_sat_V"][:])) if "psi_sat_V" in m else None]

    def clean(v):
        return [None if (isinstance(x, float) and math.isnan(x)) else x for x in v]

    cols = {k: clean(pts[k][:].tolist()) if pts[k].dtype.kind == "f" else [text(s).rstrip("\x00 ") for s in pts[k][:]]
            for k in axes + figures}
    shortest = None
    if "shortest" in f:
        g = f["shortest"]
        m = g["series"].shape[0]
        shortest = {}
        for name, ds in g.items():
            if ds.ndim != 1 or ds.shape[0] != m:
                fail(path, f"shortest/{name} shape {ds.shape}, expected ({m},)")
            for a in ["units", "description"]:
                if a not in ds.attrs:
                    fail(path, f"shortest/{name} has no {a} attribute")
            v = ds[:].tolist() if ds.dtype.kind in "fi" else [text(s).rstrip("\x00 ") for s in ds[:]]
            shortest[name] = clean(v) if ds.dtype.kind == "f" else v
        for a in ["interpolation", "dibl_max_mV_per_V", "ss_max_mV_per_dec", "vt_rolloff_max_mV"]:
            if a not in g.attrs:
                fail(path, f"shortest attribute {a} missing")
        shortest["criteria"] = {a: clean([float(g.attrs[a])])[0]
                                for a in ["dibl_max_mV_per_V", "ss_max_mV_per_dec", "vt_rolloff_max_mV"]}
    return {"file": path, "points": n, "shortest": shortest, "point_index": idx, "status": status, "columns": cols,
            "curve_total": int(total), "maps": maps, "complete": complete,
            "plan": text(f.attrs["plan"]),
            "method": [text(s) for s in pts["method"][:]] if v2 else None,
            "warnings": [text(s) for s in pts["warnings"][:]] if v2 else None,
            "base_device": text(f.attrs["base_device"]) if v2 else None,
            "inputs": json.loads(text(f.attrs["inputs"])) if v2 else None}


out = [check(p) for p in sys.argv[1:]]
print(json.dumps(out))
