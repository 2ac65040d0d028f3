"""Import speed and memory: mynet's whole import (parse, store, merge) beside the bare parsers.

Run: python benchmarks/bench_import.py [--n 10000]

Writes 10,000 generated vCard 3.0 cards and a 10,000-row CSV (invented people,
reserved example domains, a fifth of them duplicated across the two files with
other spellings), then in fresh subprocesses (so peak memory is each run's own):
  * a plain ``vobject.readComponents`` loop over the .vcf,
  * a plain ``pandas.read_csv`` of the .csv,
  * ``mynet import`` of each file into a fresh workspace, and of both together.
Prints seconds, peak RSS (MiB) and the ratio to the bare parse.
"""

from __future__ import annotations

import argparse
import json
import random
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

FIRST = "Ana Bo Cy Di Ed Fay Gus Hal Ida Jo Kim Lu Mo Ned Oona Pia Quin Rui Sol Tove Uma Vic Wen Xia Yan Zoe".split()
LAST = "Lind Ek Moss Park Nam Ro Tam Um Vo Wu Xu Yi Zed Abe Berg Cole Dahl Eng Falk Grau Holm Ivar Jung Kask".split()
ORGS = ["Quillon Labs", "Velvane Robotics", "Corrimont Labs", "Harrowgate Logistics", "Brennick Maritime",
        "Dunmere Consulting", "Orsolan Biotech", "Thistlecombe Energy"]


def people(n: int, seed: int = 5):
    rng = random.Random(seed)
    for i in range(n):
        first, last = rng.choice(FIRST), rng.choice(LAST)
        yield {"first": first, "last": last,
               "email": f"{first}.{last}.{i}@{rng.choice(['q', 'v', 'c'])}.example".lower(),
               "phone": f"+44 7700 9{i % 100000:05d}", "org": rng.choice(ORGS), "title": "Engineer",
               "note": "Met at the spring workshop, talked about rowing; follow up"}


def write_files(folder: Path, n: int) -> tuple[Path, Path]:
    vcf, csvp = folder / "people.vcf", folder / "people.csv"
    with vcf.open("w", encoding="utf-8", newline="") as f:
        for p in people(n):
            f.write("BEGIN:VCARD\r\nVERSION:3.0\r\n"
                    f"N:{p['last']};{p['first']};;;\r\nFN:{p['first']} {p['last']}\r\n"
                    f"EMAIL;TYPE=INTERNET:{p['email']}\r\nTEL;TYPE=CELL:{p['phone']}\r\n"
                    f"ORG:{p['org']}\r\nTITLE:{p['title']}\r\nNOTE:{p['note'].replace(',', chr(92) + ',')}\r\n"
                    "CATEGORIES:work,rowing\r\nEND:VCARD\r\n")
    rng = random.Random(9)
    all_people = list(people(n))
    with csvp.open("w", encoding="utf-8", newline="") as f:
        f.write("Full name,E-mail,Mobile,Company,Job title,Notes\n")
        for i in range(n):
            if rng.random() < 0.2:
                p = all_people[i]
            else:  # someone new: a fresh name draw, address and number
                p = dict(next(people(1, seed=100000 + i)), email=f"new{i}@n.example",
                         phone=f"+44 7700 8{i % 100000:05d}")
            email = p["email"].upper() if rng.random() < 0.5 else p["email"]
            f.write(f"\"{p['last']}, {p['first']}\",{email},{p['phone'].replace(' ', '')},{p['org']} "
                    f"Ltd,{p['title']},\"{p['note']}\"\n")
    return vcf, csvp


def peak_mib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def bare_vobject(path: str) -> dict:
    import vobject

    t = time.perf_counter()
    with open(path, encoding="utf-8") as f:
        n = sum(1 for _ in vobject.readComponents(f))
    return {"what": "vobject.readComponents loop", "cards": n, "seconds": round(time.perf_counter() - t, 2),
            "peak_mib": round(peak_mib(), 1)}


def bare_pandas(path: str) -> dict:
    import pandas as pd

    t = time.perf_counter()
    df = pd.read_csv(path, dtype=str, keep_default_na=False)
    return {"what": "pandas.read_csv", "rows": len(df), "seconds": round(time.perf_counter() - t, 2),
            "peak_mib": round(peak_mib(), 1)}


def mynet_import(*paths: str) -> dict:
    from mynet.store import Store
    from mynet.workspace.importing import import_paths

    ws = Path(tempfile.mkdtemp()) / "ws.sqlite"
    t = time.perf_counter()
    with Store(ws) as store:
        rep = import_paths(store, list(paths), region="GB")
    return {"what": "mynet import " + " + ".join(Path(p).name for p in paths), "records": rep.records_read,
            "contacts": rep.contacts_after, "merged": rep.merged_records, "seconds": round(time.perf_counter() - t, 2),
            "peak_mib": round(peak_mib(), 1)}


def sub(call: str) -> dict:
    code = f"import sys, json; sys.path.insert(0, 'benchmarks'); import bench_import as b; print(json.dumps(b.{call}))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=900)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=10_000)
    args = ap.parse_args()
    folder = Path(tempfile.mkdtemp(prefix="mynet-bench-"))
    vcf, csvp = write_files(folder, args.n)
    runs = [sub(f"bare_vobject({str(vcf)!r})"), sub(f"mynet_import({str(vcf)!r})"),
            sub(f"bare_pandas({str(csvp)!r})"), sub(f"mynet_import({str(csvp)!r})"),
            sub(f"mynet_import({str(vcf)!r}, {str(csvp)!r})")]
    for r in runs:
        print(json.dumps(r))
    print(f"vCard: mynet / bare vobject = {runs[1]['seconds'] / max(runs[0]['seconds'], 1e-9):.2f}x")
    print(f"CSV:   mynet / bare pandas  = {runs[3]['seconds'] / max(runs[2]['seconds'], 1e-9):.2f}x")


if __name__ == "__main__":
    main()
