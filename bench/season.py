#!/usr/bin/python3
"""A synthetic field season as Cairn import CSVs (issue 16, bench/run).

The full season: 2 000 contacts with 100 mapped points each (200 000 points),
100 000 stations (50 beside each contact) and 300 000 planar readings (three
per station: a bedding reading of the contact beside it, a joint and a
foliation or, at one station in twenty, a slope face). A fraction (--scale
1/8, 1/4, 1/2, 1) keeps the first contacts and everything beside them, so the
fractions are prefixes of the full season made the same way. --quick makes 8
contacts (a CI smoke run).

Everything is invented (an invented field area in UTM zone 8N, invented
people and units) and deterministic: each contact draws from its own numpy
Generator seeded with (SEED, contact index), so a fraction is exactly the
first part of the full season.

Faults planted on purpose so that the check has work to do: 2% of the bedding
readings have the dip on the wrong side (strike turned 180 degrees), 2% are off
by 25 degrees, 1% of contacts have one point 60 m off the plane, and every
200th station has a duplicated joint reading entered 2 minutes later.

Usage: season.py OUTDIR [--scale 1/8|1/4|1/2|1] [--quick]
Writes OUTDIR/{units,contacts,stations,points,planes}.csv and OUTDIR/season.json
(counts). Run with Debian's /usr/bin/python3 (numpy).
"""
import argparse
import json
import os
import sys
from fractions import Fraction

import numpy as np

SEED = 16  # issue 16
FULL_CONTACTS = 2000
POINTS_PER_CONTACT = 100
STATIONS_PER_CONTACT = 50
UNITS = 21
PEOPLE = ["AB", "CD", "EF", "GH", "JK", "LM", "NP", "QR"]
E0, N0 = 400000.0, 6600000.0  # invented origin, UTM zone 8N
CELL = 1000.0  # metres between contact centres
COLUMNS = 50  # contacts per row of the grid


def contact_count(scale, quick):
    if quick:
        return 8
    return int(Fraction(scale) * FULL_CONTACTS)


def fmt(x, nd=2):
    return f"{x:.{nd}f}"


def write_season(out, n_contacts):
    os.makedirs(out, exist_ok=True)
    with open(os.path.join(out, "units.csv"), "w", newline="") as f:
        f.write("unit,name,age_rank\n")
        for u in range(UNITS):
            f.write(f"U{u:02d},Unit {u:02d},{u + 1}\n")
    with open(os.path.join(out, "contacts.csv"), "w", newline="") as f:
        f.write("contact,lower_unit,upper_unit,type\n")
        for c in range(n_contacts):
            lo = c % (UNITS - 1)
            f.write(f"C{c:04d},U{lo:02d},U{lo + 1:02d},depositional\n")  # age_rank 1 = oldest
    fs = open(os.path.join(out, "stations.csv"), "w", newline="")
    fp = open(os.path.join(out, "points.csv"), "w", newline="")
    fr = open(os.path.join(out, "planes.csv"), "w", newline="")
    fs.write("station,easting,northing,elevation,h_accuracy,v_accuracy,source,unit,observer,time\n")
    fp.write("contact,easting,northing,elevation,h_accuracy,v_accuracy,source,time\n")
    fr.write("station,kind,strike,dip,north,contact,quality,facing,ref,time\n")
    counts = {"contacts": n_contacts, "stations": 0, "points": 0, "planes": 0}
    for c in range(n_contacts):
        rng = np.random.default_rng([SEED, c])
        ce = E0 + (c % COLUMNS) * CELL + 500.0
        cn = N0 + (c // COLUMNS) * CELL + 500.0
        cz = 800.0 + 300.0 * np.sin(c * 0.37)
        strike = rng.uniform(0, 360)
        dip = rng.uniform(15, 70)
        s_rad = np.radians(strike)
        dd_rad = np.radians(strike + 90.0)
        # unit vectors along strike and down dip direction (horizontal)
        along = np.array([np.sin(s_rad), np.cos(s_rad)])
        downdip = np.array([np.sin(dd_rad), np.cos(dd_rad)])
        tan_dip = np.tan(np.radians(dip))
        lower = c % (UNITS - 1)
        upper = lower + 1
        day = 1 + c // 20  # twenty contacts a day across the season
        month, dom = (6 + (day - 1) // 30, 1 + (day - 1) % 30)
        date = f"2026-{month:02d}-{dom:02d}"
        observer = PEOPLE[c % len(PEOPLE)]
        # points along the contact's trace over uneven ground
        s = rng.uniform(-400, 400, POINTS_PER_CONTACT)
        t = rng.uniform(-60, 60, POINTS_PER_CONTACT)
        pe = ce + s * along[0] + t * downdip[0] + rng.normal(0, 3, POINTS_PER_CONTACT)
        pn = cn + s * along[1] + t * downdip[1] + rng.normal(0, 3, POINTS_PER_CONTACT)
        pz = cz - t * tan_dip + rng.normal(0, 5, POINTS_PER_CONTACT)
        if c % 100 == 37:
            pz[0] += 60.0  # a mis-located point
        for k in range(POINTS_PER_CONTACT):
            fp.write(f"C{c:04d},{fmt(pe[k])},{fmt(pn[k])},{fmt(pz[k])},3,5,gps,{date}T{8 + k // 20:02d}:{k % 60:02d}:00Z\n")
        counts["points"] += POINTS_PER_CONTACT
        # stations beside the contact, above it in the younger unit or below in the older
        ss = rng.uniform(-300, 300, STATIONS_PER_CONTACT)
        tt = rng.uniform(-200, 200, STATIONS_PER_CONTACT)
        off = rng.uniform(20, 80, STATIONS_PER_CONTACT) * rng.choice([-1.0, 1.0], STATIONS_PER_CONTACT)
        se = ce + ss * along[0] + tt * downdip[0]
        sn = cn + ss * along[1] + tt * downdip[1]
        sz = cz - tt * tan_dip + off
        noise_s = rng.normal(0, 3, STATIONS_PER_CONTACT)
        noise_d = rng.normal(0, 3, STATIONS_PER_CONTACT)
        fault = rng.uniform(0, 1, STATIONS_PER_CONTACT)
        joint_s = rng.uniform(0, 360, STATIONS_PER_CONTACT)
        joint_d = rng.uniform(50, 90, STATIONS_PER_CONTACT)
        third_s = rng.uniform(0, 360, STATIONS_PER_CONTACT)
        third_d = rng.uniform(10, 80, STATIONS_PER_CONTACT)
        for k in range(STATIONS_PER_CONTACT):
            code = f"S{c:04d}-{k:02d}"
            unit = upper if off[k] > 0 else lower
            hh, mm = 9 + k // 6, (k % 6) * 10
            time = f"{date}T{hh:02d}:{mm:02d}:00Z"
            fs.write(f"{code},{fmt(se[k])},{fmt(sn[k])},{fmt(sz[k])},3,5,gps,U{unit:02d},{observer},{time}\n")
            bs = strike + noise_s[k]
            bd = min(max(dip + noise_d[k], 1.0), 89.0)
            if fault[k] < 0.02:
                bs += 180.0
            elif fault[k] < 0.04:
                bs += 25.0
            bs %= 360.0
            fr.write(f"{code},bedding,{fmt(bs, 1)},{fmt(bd, 1)},true,C{c:04d},5,upright,{code}a,{time}\n")
            fr.write(f"{code},joint,{fmt(joint_s[k], 1)},{fmt(joint_d[k], 1)},true,,4,unknown,{code}b,{time}\n")
            if (c * STATIONS_PER_CONTACT + k) % 200 == 0:
                later = f"{date}T{hh:02d}:{mm + 2:02d}:00Z"
                fr.write(f"{code},joint,{fmt(joint_s[k], 1)},{fmt(joint_d[k], 1)},true,,4,unknown,,{later}\n")
                counts["planes"] += 1
            if k % 20 == 7:
                fr.write(f"{code},slope,{fmt(third_s[k], 1)},{fmt(third_d[k], 1)},true,,5,unknown,{code}c,{time}\n")
            else:
                fr.write(f"{code},foliation,{fmt(third_s[k], 1)},{fmt(third_d[k], 1)},true,,4,unknown,{code}c,{time}\n")
            counts["planes"] += 3
        counts["stations"] += STATIONS_PER_CONTACT
    for f in (fs, fp, fr):
        f.close()
    with open(os.path.join(out, "season.json"), "w") as f:
        json.dump(counts, f, indent=1)
    return counts


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("outdir")
    ap.add_argument("--scale", default="1", choices=["1/8", "1/4", "1/2", "1"])
    ap.add_argument("--quick", action="store_true", help="8 contacts only (CI smoke run)")
    a = ap.parse_args()
    counts = write_season(a.outdir, contact_count(a.scale, a.quick))
    print(json.dumps(counts))
    return 0


if __name__ == "__main__":
    sys.exit(main())
