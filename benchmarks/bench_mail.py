"""Mail import speed and memory: mynet's mail reader and whole import beside the standard library.

Run: python benchmarks/bench_mail.py [--n 10000] [--baseline COMMIT]

Writes ``--n`` generated messages (invented people on reserved example domains,
in threads, half of them discussion-list mail with List-Id / List-Post /
Precedence headers, a few rewritten by a list relay, a bot and a newsletter) as
one mbox, as a Maildir (cur/ and new/) and as a folder of message files without a
suffix. Then, in fresh subprocesses (so peak memory is each run's own):

* the plain standard-library approach: ``mailbox.mbox`` with
  ``email.parser.BytesHeaderParser`` reading From/To/Cc/Date/Message-ID of every
  message (and ``mailbox.Maildir`` for the Maildir);
* mynet's mail reader alone (``parse_mail``) on the mbox;
* ``import_paths`` (read, store, find the people you corresponded with, merge)
  of the mbox, of the Maildir and of the folder;
* the same mbox reader and import at ``--baseline`` (default: the commit before
  the mail reader learned lists, relays and Maildirs), extracted with
  ``git archive`` into a temporary folder, when git and that commit are
  available: so today's and the earlier figures are measured side by side.

Each measurement runs ``--repeat`` times (default 3), the runs of all
measurements interleaved round by round, and the median is shown with every
run's seconds. Prints seconds, peak RSS (MiB) and the ratios.
"""

from __future__ import annotations

import argparse
import json
import os
import random
import resource
import subprocess
import sys
import tarfile
import tempfile
import time
from datetime import datetime, timedelta, timezone
from email.utils import format_datetime
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
BASELINE = "67cd97f"
FIRST = "Ana Bo Cy Di Ed Fay Gus Hal Ida Jo Kim Lu Mo Ned Oona Pia Quin Rui Sol Tove Uma Vic Wen Xia Yan Zoe".split()
LAST = "Lind Ek Moss Park Nam Ro Tam Um Vo Wu Xu Yi Zed Abe Berg Cole Dahl Eng Falk Grau Holm Ivar Jung Kask".split()
DOMAINS = ["quillon.example", "velvane.example", "corrimont.example", "mail.example", "post.example"]
YOU = ("Robin Avenell", "robin@quillon.example")


def messages(n: int, seed: int = 7) -> list[bytes]:
    """``n`` header blocks (with a one-line body), in threads; the user writes in some of them."""
    rng = random.Random(seed)
    people = [(f"{rng.choice(FIRST)} {rng.choice(LAST)}", f"p{i}@{rng.choice(DOMAINS)}") for i in range(400)]
    start = datetime(2010, 1, 4, 9, 0, tzinfo=timezone.utc)
    out: list[bytes] = []
    k = 0
    while len(out) < n:
        listed = rng.random() < 0.5
        size = rng.randint(1, 6)
        writers = rng.sample(people, 3) + ([YOU] if rng.random() < 0.3 else [])
        refs: list[str] = []
        when = start + timedelta(hours=7 * k)
        for j in range(size):
            if len(out) >= n:
                break
            name, addr = writers[j % len(writers)]
            mid = f"<{k}.{j}@{addr.split('@')[1]}>"
            lines = [f"From {addr} {when:%a %b %d %H:%M:%S %Y}"]
            if listed and rng.random() < 0.1:  # a list relay that rewrites From (common practice)
                lines += [f'From: "{name} via Dev" <dev@lists.example>', f"X-Original-From: {name} <{addr}>"]
            else:
                lines.append(f"From: {name} <{addr}>")
            if listed:
                lines += ["To: dev@lists.example", "List-Id: Developers <dev.lists.example>",
                          "List-Post: <mailto:dev@lists.example>", "Precedence: list",
                          "List-Unsubscribe: <mailto:dev-request@lists.example?subject=unsubscribe>"]
            else:
                to = [w for w in writers if w[1] != addr]
                lines.append("To: " + ", ".join(f"{w[0]} <{w[1]}>" for w in to))
            lines += [f"Date: {format_datetime(when)}", f"Subject: {'Re: ' if j else ''}Topic {k}",
                      f"Message-ID: {mid}"]
            if refs:
                lines += [f"In-Reply-To: {refs[-1]}", "References: " + " ".join(refs)]
            lines += ["MIME-Version: 1.0", "Content-Type: text/plain; charset=UTF-8", "", "A short body line.", ""]
            out.append("\n".join(lines).encode("utf-8"))
            refs.append(mid)
            when += timedelta(minutes=rng.randint(5, 600))
        k += 1
    return out[:n]


def write_inputs(folder: Path, n: int) -> dict[str, str]:
    msgs = messages(n)
    box = folder / "list.mbox"
    box.write_bytes(b"\n".join(msgs) + b"\n")
    maildir = folder / "Maildir"
    for sub in ("cur", "new", "tmp"):
        (maildir / sub).mkdir(parents=True)
    plain = folder / "saved"
    plain.mkdir()
    for i, m in enumerate(msgs):
        body = m.split(b"\n", 1)[1]  # no envelope line in a Maildir or a saved message
        (maildir / ("cur" if i % 4 else "new") / f"{1262592000 + i}.M{i}P1.host:2,S").write_bytes(body)
        (plain / str(i + 1)).write_bytes(body)
    return {"mbox": str(box), "maildir": str(maildir), "folder": str(plain)}


def peak_mib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def stdlib_mbox(path: str) -> dict:
    """The plain library approach: mailbox.mbox and a header-only parse of each message."""
    from email.parser import BytesHeaderParser
    from email.utils import getaddresses

    parser = BytesHeaderParser()
    t = time.perf_counter()
    n = people = 0
    for raw in _mbox_bytes(path):
        msg = parser.parsebytes(raw)
        people += len(getaddresses(msg.get_all("from", []) + msg.get_all("to", []) + msg.get_all("cc", [])))
        _ = (msg.get("date"), msg.get("message-id"))
        n += 1
    return {"what": "stdlib mailbox.mbox + BytesHeaderParser", "messages": n, "addresses": people,
            "seconds": round(time.perf_counter() - t, 2), "peak_mib": round(peak_mib(), 1)}


def _mbox_bytes(path: str):
    import mailbox

    box = mailbox.mbox(path, create=False)
    for key in box.iterkeys():
        yield box.get_bytes(key)


def stdlib_maildir(path: str) -> dict:
    import mailbox
    from email.parser import BytesHeaderParser
    from email.utils import getaddresses

    parser = BytesHeaderParser()
    t = time.perf_counter()
    n = people = 0
    box = mailbox.Maildir(path, factory=None, create=False)
    for key in box.iterkeys():
        msg = parser.parsebytes(box.get_bytes(key))
        people += len(getaddresses(msg.get_all("from", []) + msg.get_all("to", []) + msg.get_all("cc", [])))
        n += 1
    return {"what": "stdlib mailbox.Maildir + BytesHeaderParser", "messages": n, "addresses": people,
            "seconds": round(time.perf_counter() - t, 2), "peak_mib": round(peak_mib(), 1)}


def reader(path: str, label: str) -> dict:
    from mynet.sources.mbox import parse_mail

    data = Path(path).read_bytes()
    t = time.perf_counter()
    res = parse_mail(data, path)
    return {"what": f"{label} parse_mail (mbox)", "messages": len(res.interactions),
            "seconds": round(time.perf_counter() - t, 2), "peak_mib": round(peak_mib(), 1)}


def full_import(path: str, label: str) -> dict:
    from mynet.store import Store
    from mynet.workspace.importing import import_paths
    from mynet.workspace.people import set_me

    ws = Path(tempfile.mkdtemp()) / "ws.sqlite"
    t = time.perf_counter()
    with Store(ws) as store:
        set_me(store, [YOU[1]], [YOU[0]])
        rep = import_paths(store, [path])
        contacts = len(store.contacts())
    return {"what": f"{label} import {Path(path).name}", "messages": sum(f.interactions for f in rep.files),
            "contacts": contacts, "seconds": round(time.perf_counter() - t, 2), "peak_mib": round(peak_mib(), 1)}


REPEAT = 3


def sub(call: str, tree: Path = ROOT) -> dict:
    """Run ``call`` once in a fresh subprocess (so peak memory is the run's own)."""
    code = (f"import sys, json; sys.path.insert(0, {str(tree)!r}); sys.path.insert(0, {str(ROOT / 'benchmarks')!r}); "
            f"import bench_mail as b; print(json.dumps(b.{call}))")
    env = dict(os.environ, PYTHONPATH=str(tree))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=1800,
                         env=env, cwd=tempfile.gettempdir())
    return json.loads(out.stdout.strip().splitlines()[-1])


def rounds(calls: dict[str, tuple[str, Path]], repeat: int) -> dict[str, dict]:
    """Every call once per round, ``repeat`` rounds, interleaved (a shared machine's load drifts); the median run."""
    seen: dict[str, list[dict]] = {k: [] for k in calls}
    for _ in range(repeat):
        for key, (call, tree) in calls.items():
            seen[key].append(sub(call, tree))
    out = {}
    for key, runs in seen.items():
        runs.sort(key=lambda r: r["seconds"])
        out[key] = dict(runs[len(runs) // 2], runs=[r["seconds"] for r in runs])
    return out


def baseline_tree(commit: str) -> Path | None:
    """The mynet package as it was at ``commit``, extracted into a temporary folder (None without git)."""
    folder = Path(tempfile.mkdtemp(prefix="mynet-baseline-"))
    try:
        blob = subprocess.run(["git", "-C", str(ROOT), "archive", "--format=tar", commit, "mynet"],
                              capture_output=True, check=True, timeout=120).stdout
    except (OSError, subprocess.SubprocessError):
        return None
    archive = folder / "tree.tar"
    archive.write_bytes(blob)
    with tarfile.open(archive) as tar:
        tar.extractall(folder, filter="data")
    return folder


def main() -> None:
    global REPEAT
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=REPEAT, help="runs of each measurement; the median is shown")
    ap.add_argument("--baseline", default=BASELINE, help="commit to compare with (git archive); '' to skip")
    args = ap.parse_args()
    REPEAT = max(1, args.repeat)
    folder = Path(tempfile.mkdtemp(prefix="mynet-bench-mail-"))
    paths = write_inputs(folder, args.n)
    calls = {"stdlib_mbox": (f"stdlib_mbox({paths['mbox']!r})", ROOT),
             "stdlib_maildir": (f"stdlib_maildir({paths['maildir']!r})", ROOT),
             "reader": (f"reader({paths['mbox']!r}, 'now')", ROOT),
             "import_mbox": (f"full_import({paths['mbox']!r}, 'now')", ROOT),
             "import_maildir": (f"full_import({paths['maildir']!r}, 'now')", ROOT),
             "import_folder": (f"full_import({paths['folder']!r}, 'now')", ROOT)}
    tree = baseline_tree(args.baseline) if args.baseline else None
    if tree is not None:
        calls["reader_before"] = (f"reader({paths['mbox']!r}, 'before')", tree)
        calls["import_before"] = (f"full_import({paths['mbox']!r}, 'before')", tree)
    runs = rounds(calls, REPEAT)
    for r in runs.values():
        print(json.dumps(r))
    s = {k: max(v["seconds"], 1e-9) for k, v in runs.items()}
    print(f"mbox reader:  mynet / stdlib = {s['reader'] / s['stdlib_mbox']:.2f}x")
    if tree is not None:
        print(f"mbox reader:  now / before   = {s['reader'] / s['reader_before']:.2f}x")
        print(f"mbox import:  now / before   = {s['import_mbox'] / s['import_before']:.2f}x")
        print(f"Maildir import / mbox import before = {s['import_maildir'] / s['import_before']:.2f}x")
        print(f"folder import / mbox import before  = {s['import_folder'] / s['import_before']:.2f}x")
    else:
        print(f"(no baseline: git or commit {args.baseline!r} unavailable)")


if __name__ == "__main__":
    main()
