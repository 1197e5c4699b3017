# Golden values for numfmt.Fixed: Python's own thousands grouping and
# rounding ("{:,.{d}f}", PEP 378), an implementation independent of
# golang.org/x/text. Run from this directory with the Debian Python:
#   /usr/bin/python3 fixed_golden.py
# It writes fixed_golden.json. Values rounding to zero from below are left
# out: Python prints "-0.00" there, which numfmt deliberately does not.
import json
import sys

cases = [
    (20844556.1, 0), (20844556.1, 2), (7e6, 0), (2.8e2, 1), (2450.37, 1),
    (-2450.37, 2), (999.995, 2), (1234567.891, 3), (0.5, 0), (1.5, 0),
    (2.5, 0), (0.125, 2), (1.005, 2), (-1234.5, 0), (123456789012345.67, 2),
    (1e15, 0), (0.0016, 4), (6.3e-14, 3), (-9999999.999, 2), (1e22, 0),
]
rows = [{"x": x, "decimals": d, "want": "{:,.{d}f}".format(x, d=d)} for x, d in cases]
with open("fixed_golden.json", "w") as f:
    json.dump({"source": "Python " + sys.version.split()[0] + "; fixed_golden.py", "cases": rows}, f, indent=1)
    f.write("\n")
