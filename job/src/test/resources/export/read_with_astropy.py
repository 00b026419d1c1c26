"""Reads a starderive export with astropy (an independent reader) and prints what it found as JSON.

Usage: python3 read_with_astropy.py FITS_FILE VOTABLE_FILE COLUMN [COLUMN ...]
The JUnit test (ExportReadByAstropyTest) compares the output with the Parquet catalogue; this script only reads.
For each file: the row count; per column the unit string as written, the unit as astropy parsed it (or the parse
error), the UCD and the description; the values of the named columns (null for a masked value); the provenance
(FITS header keywords / VOTable PARAMs).
"""
import json
import math
import sys
import warnings

import astropy.units as u
from astropy.io import fits
from astropy.io import votable
from astropy.table import Table


def parsed(unit_string, fmt):
    if not unit_string:
        return {"written": "", "parsed": None, "error": None}
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            unit = u.Unit(unit_string, format=fmt)
        return {"written": unit_string, "parsed": unit.to_string("vounit"), "error": None}
    except Exception as e:  # astropy raises ValueError for an unparsed unit
        return {"written": unit_string, "parsed": None, "error": str(e).split("\n")[0]}


def plain(v):
    if v is None:
        return None
    if hasattr(v, "item"):
        v = v.item()
    if isinstance(v, bytes):
        v = v.decode()
    if isinstance(v, float) and math.isnan(v):
        return None
    return v


def values(table, names):
    out = {}
    for n in names:
        col = table[n]
        vals = []
        for i in range(len(table)):
            masked = hasattr(col, "mask") and bool(col.mask[i])
            vals.append(None if masked else plain(col[i]))
        out[n] = vals
    return out


def read_fits(path, names):
    with fits.open(path) as hdul:
        h = hdul[1].header
        cols = {}
        for k in range(1, h["TFIELDS"] + 1):
            cols[h["TTYPE%d" % k]] = {
                "unit": parsed(h.get("TUNIT%d" % k, ""), "fits"),
                "ucd": h.get("TUCD%d" % k),
                "description": h.get("TCOMM%d" % k),
                "tform": h["TFORM%d" % k],
            }
        prov = {key: h[key] for key in h if key.startswith("SD") or key == "CREATOR"}
    t = Table.read(path, format="fits", hdu=1)
    return {"rows": len(t), "columns": cols, "values": values(t, names), "provenance": prov}


def read_votable(path, names):
    vt = votable.parse(path)
    tab = vt.get_first_table()
    cols = {}
    for f in tab.fields:
        # astropy parses the unit attribute with its VOUnits parser while reading; one it cannot parse stays an
        # UnrecognizedUnit that keeps the string
        if f.unit is None:
            unit = {"written": "", "parsed": None, "error": None}
        elif isinstance(f.unit, u.UnrecognizedUnit):
            unit = {"written": f.unit.name, "parsed": None, "error": "astropy: unrecognized unit"}
        else:
            unit = {"written": None, "parsed": f.unit.to_string("vounit"), "error": None}
        cols[f.name] = {
            "unit": unit,
            "ucd": f.ucd,
            "description": f.description,
            "datatype": f.datatype,
        }
    prov = {p.name: plain(p.value) for p in tab.params}
    t = tab.to_table()
    return {"rows": len(t), "columns": cols, "values": values(t, names), "provenance": prov}


def main():
    fits_path, vot_path, names = sys.argv[1], sys.argv[2], sys.argv[3:]
    import astropy
    print(json.dumps({"astropy": astropy.__version__, "fits": read_fits(fits_path, names),
                      "votable": read_votable(vot_path, names)}))


if __name__ == "__main__":
    main()
