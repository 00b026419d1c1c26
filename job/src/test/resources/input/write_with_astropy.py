"""Writes a CSV table as a FITS binary table and a VOTable with astropy (a writer independent of the job's reader).

Usage: write_with_astropy.py IN.csv OUT.fits OUT.vot [COLUMN=UNIT ...]
Empty CSV cells become masked values (astropy writes them as TNULL or NaN in FITS, empty cells in the VOTable).
"""
import sys

from astropy.table import Table

src, fits, vot = sys.argv[1:4]
t = Table.read(src, format="ascii.csv")
for pair in sys.argv[4:]:
    name, unit = pair.split("=", 1)
    t[name].unit = unit
t.write(fits, overwrite=True)
t.write(vot, format="votable", overwrite=True)
