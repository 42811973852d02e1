"""The repository stands alone, and so does the installed program.

1. No tracked file refers to the folder beside the repository ("../" + "shared"):
   a user's clone has nothing beside it (common practice, no published source).
2. No bundled project file stores a machine's absolute path: the demo camp file's
   merges.peer_path values are relative (read with Python's own sqlite3 module,
   read-only and immutable).
3. `cmake --install` into a scratch prefix gives a `cairn` that runs `cairn demo`
   with nothing from the source or build tree: its data files come from
   PREFIX/share/cairn, and the binary holds no string naming the source tree.
4. `cpack -G DEB` gives a Debian package whose control file declares its
   dependencies (Debian Policy Manual, section 7.1: Depends, here computed by
   dpkg-shlibdeps), and which unpacked with `dpkg -x` into a scratch root runs
   `cairn demo` from there.
"""
import os
import shutil
import sqlite3
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import parse_args, Tally  # noqa: E402

args = parse_args(required=("cairn", "source", "build"))
t = Tally("test_standalone")
source = os.path.abspath(args.source)
build = os.path.abspath(args.build)
needle = "../" + "shared"


def tracked_files():
    r = subprocess.run(["git", "-C", source, "ls-files", "-z"], capture_output=True)
    if r.returncode == 0:
        return [f for f in r.stdout.decode().split("\0") if f]
    files = []  # not a git checkout (an unpacked archive): every file but build folders
    for root, dirs, names in os.walk(source):
        dirs[:] = [d for d in dirs if not d.startswith("build") and d != ".git"]
        files += [os.path.relpath(os.path.join(root, n), source) for n in names]
    return files


files = tracked_files()
t.check(len(files) > 50, "the repository lists its files (%d)" % len(files))
offenders = []
for f in files:
    path = os.path.join(source, f)
    if not os.path.isfile(path):
        continue
    with open(path, "rb") as fh:
        if needle.encode() in fh.read():
            offenders.append(f)
t.check(not offenders, "no tracked file refers to %s: %s" % (needle, offenders))
t.check(not [f for f in files if f.endswith(("-wal", "-shm"))], "no SQLite -wal/-shm file is tracked")

camp = os.path.join(source, "demo_project", "camp.cairn")
db = sqlite3.connect("file:%s?mode=ro&immutable=1" % camp, uri=True)
paths = [r[0] for r in db.execute("SELECT peer_path FROM merges")]
db.close()
t.check(len(paths) >= 2, "the demo camp file records its merges (%d)" % len(paths))
for p in paths:
    t.check(not os.path.isabs(p) and not p.startswith(".."), "merges.peer_path is relative: %r" % p)


def run_demo(cairn, where, env):
    out = tempfile.mkdtemp(prefix="demo-", dir=where)
    r = subprocess.run([cairn, "demo", out], capture_output=True, text=True, env=env)
    ok = r.returncode == 0 and os.path.isfile(os.path.join(out, "camp.cairn"))
    if not ok:
        print(r.stdout, r.stderr)
    return ok


clean_env = {k: v for k, v in os.environ.items() if k != "CAIRN_ASSETS"}
with tempfile.TemporaryDirectory() as tmp:
    prefix = os.path.join(tmp, "prefix")
    r = subprocess.run(["cmake", "--install", build, "--prefix", prefix], capture_output=True, text=True)
    t.check(r.returncode == 0, "cmake --install succeeds: " + r.stderr[-500:])
    installed = os.path.join(prefix, "bin", "cairn")
    t.check(os.path.isfile(os.path.join(prefix, "share", "cairn", "wmm2025.cof")), "the magnetic model is installed")
    t.check(os.path.isfile(os.path.join(prefix, "share", "cairn", "fonts", "DejaVuSans.ttf")), "the font is installed")
    t.check(os.path.isfile(os.path.join(prefix, "share", "doc", "cairn", "copyright")), "the licence is installed")
    with open(installed, "rb") as fh:
        t.check(source.encode() not in fh.read(), "the installed binary names no path of the source tree")
    t.check(run_demo(installed, tmp, clean_env), "the installed cairn runs `cairn demo`")

    debs = os.path.join(tmp, "debs")
    r = subprocess.run(["cpack", "-G", "DEB", "-B", debs], cwd=build, capture_output=True, text=True)
    t.check(r.returncode == 0, "cpack -G DEB succeeds: " + (r.stdout + r.stderr)[-800:])
    found = [f for f in os.listdir(debs) if f.startswith("cairn_") and f.endswith(".deb")] if os.path.isdir(debs) else []
    t.check(len(found) == 1, "one package cairn_*.deb: %s" % found)
    if found:
        deb = os.path.join(debs, found[0])
        depends = subprocess.run(["dpkg-deb", "-f", deb, "Depends"], capture_output=True, text=True).stdout
        for lib in ("libsqlite3", "libgeographiclib", "libsdl2", "libc6", "libexif12"):
            t.check(lib in depends, "the package depends on %s: %s" % (lib, depends.strip()))
        root = os.path.join(tmp, "root")
        r = subprocess.run(["dpkg", "-x", deb, root], capture_output=True, text=True)
        t.check(r.returncode == 0, "dpkg -x unpacks the package: " + r.stderr)
        t.check(run_demo(os.path.join(root, "usr", "bin", "cairn"), tmp, clean_env),
                "cairn from the unpacked package runs `cairn demo`")

sys.exit(t.finish())
