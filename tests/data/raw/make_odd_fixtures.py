#!/usr/bin/env python3
"""Makes the odd and corrupt raw-file fixtures from the two ngspice-written files
three_plots.raw (binary) and three_plots_ascii.raw (ASCII) in the folder given.
Each corrupt file breaks one thing; tests/unit/test_raw.cpp lists the error each must give."""
import random, struct, sys
from pathlib import Path

d = Path(sys.argv[1] if len(sys.argv) > 1 else ".")
binary = (d / "three_plots.raw").read_bytes()
ascii_ = (d / "three_plots_ascii.raw").read_bytes()
c = d / "corrupt"
c.mkdir(exist_ok=True)

def plots_binary(data):
    """Splits a binary raw file into its plots (header, data) using the header counts."""
    out, pos = [], 0
    while pos < len(data):
        start = pos
        marker = data.index(b"Binary:\n", pos) + len(b"Binary:\n")
        head = data[start:marker].decode()
        nvars = int(head.split("No. Variables:")[1].split("\n")[0])
        npts = int(head.split("No. Points:")[1].split("\n")[0])
        width = 16 if "complex" in head.split("Flags:")[1].split("\n")[0] else 8
        end = marker + nvars * npts * width
        out.append((data[start:marker], data[marker:end]))
        pos = end
    return out

def put(name, data, folder=d):
    (folder / name).write_bytes(data)

bplots = plots_binary(binary)
aplots = [b"Title:" + p for p in ascii_.split(b"Title:")[1:]]
op_a, tf_a, ac_a = aplots

# --- odd but valid ---------------------------------------------------------------
put("padded_points.raw", ascii_.replace(b"No. Points: 3\n", b"No. Points:      3           \n"))
put("complex_ac_binary.raw", b"".join(bplots[2]))
put("crlf.raw", ascii_.replace(b"\n", b"\r\n"))
zero = op_a.split(b"Values:\n")[0].replace(b"No. Points: 1", b"No. Points: 0") + b"Values:\n"
put("zero_points.raw", zero + b"\n" + tf_a)
zero_b = bplots[0][0].replace(b"No. Points: 1", b"No. Points: 0")
put("zero_points_binary.raw", zero_b + b"".join(bplots[1]))
lines = op_a.split(b"\n")
vals = lines.index(b"Values:")
lines[vals + 2] = b"\tnan"
lines[vals + 3] = b"\tinf"
lines[vals + 4] = b"\t-inf"
put("nan_inf.raw", b"\n".join(lines))
head, data = bplots[0]
data = bytearray(data)
data[8:16] = struct.pack("<d", float("nan"))
data[16:24] = struct.pack("<d", float("inf"))
data[24:32] = struct.pack("<d", float("-inf"))
put("nan_inf_binary.raw", head + bytes(data))

# --- corrupt ------------------------------------------------------------------------
put("empty.raw", b"", c)
put("truncated_binary.raw", bplots[0][0] + bplots[0][1][:40], c)
put("cut_mid_double.raw", binary[:-3], c)
ac_head = bplots[2][0].replace(b"No. Points: 3", b"No. Points: 30")
put("points_too_large.raw", b"".join(bplots[0]) + b"".join(bplots[1]) + ac_head + bplots[2][1], c)
put("variables_billions.raw", binary.replace(b"No. Variables: 9", b"No. Variables: 4000000000", 1), c)
put("missing_variables_line.raw", ascii_.replace(b"Variables:\n", b"", 1), c)
put("missing_binary_line.raw", binary.replace(b"Binary:\n", b"", 1), c)
put("missing_values_line.raw", ascii_.replace(b"Values:\n", b"", 1), c)
put("short_variable_table.raw", ascii_.replace(b"\t8\ti(vout)\tcurrent\n", b"", 1), c)
put("non_numeric.raw", ascii_.replace(b"\t1.800000000000000e+00", b"\t1.8.0e+00", 1), c)
put("duplicate_variable.raw", ascii_.replace(b"\t5\tv(g)\tvoltage", b"\t5\tvdd\tvoltage", 1), c)
put("unknown_flags.raw", binary.replace(b"Flags: real", b"Flags: imaginary", 1), c)
rng = random.Random(20261201)
put("random_bytes.raw", bytes(rng.randrange(256) for _ in range(4096)), c)
put("random_after_header.raw", bplots[0][0] + bytes(rng.randrange(256) for _ in range(50)), c)
cut = ascii_.index(b"Values:", ascii_.index(b"AC Analysis")) + 200
put("ascii_truncated.raw", ascii_[:cut], c)
put("bad_point_index.raw", ascii_.replace(b"\n 1\t", b"\n 7\t", 1), c)
put("bad_count.raw", ascii_.replace(b"No. Points: 1", b"No. Points: many", 1), c)
put("missing_flags.raw", ascii_.replace(b"Flags: real\n", b"", 1), c)
lines = op_a.rstrip(b"\n").split(b"\n")
put("extra_values.raw", b"\n".join(lines + [b"\t1.0", b"\t2.0"]) + b"\n\n" + tf_a, c)
put("header_only.raw", ascii_[: ascii_.index(b"\n") + 1], c)
put("complex_bad.raw", ascii_[: ascii_.index(b"AC Analysis")] + ascii_[ascii_.index(b"AC Analysis"):].replace(b",", b";", 1), c)
put("duplicate_header.raw", ascii_.replace(b"No. Points: 1\n", b"No. Points: 1\nNo. Points: 1\n", 1), c)
put("not_a_header.raw", b"Title: x\nPlotname: y\nHello world\n", c)
