"""Writing and drift-checking of the reference fixtures' CSV files, shared by the
generator scripts under testdata/reference (air, nitrogen, seawater).

A fixture is a list of (file name, function returning its lines); each file is a
header line of column names, then rows of numbers, with "#" comment lines
(sources, library versions) anywhere. `gen.py` rewrites the files; `gen.py
--check` regenerates them into a temporary directory and fails when a column
list, a row count or any number differs by more than the script's relative
tolerance from the committed file.
"""

import os
import subprocess
import tempfile


def debian_version(pkg):
    """Version of an installed Debian package (dpkg-query), or 'unknown'."""
    try:
        out = subprocess.run(["dpkg-query", "-W", "-f=${Version}", pkg],
                             capture_output=True, text=True, check=True)
        return out.stdout.strip() or "unknown"
    except (OSError, subprocess.CalledProcessError):
        return "unknown"


def numbers(lines):
    """Return the header line and the rows of numbers of a fixture's lines."""
    data = [l for l in lines if l and not l.startswith("#")]
    return data[0], [[float(x) for x in l.split(",")] for l in data[1:]]


def write(directory, files):
    for name, make in files:
        with open(os.path.join(directory, name), "w") as f:
            f.write("\n".join(make()) + "\n")


def check(here, files, rel_tol, write_to=None):
    """Regenerate into a temporary directory and compare with the files in here;
    print one line a file (and one a drifted number) and return the exit status."""
    write_to = write_to or (lambda d: write(d, files))
    bad = 0
    with tempfile.TemporaryDirectory() as tmp:
        write_to(tmp)
        for name, _ in files:
            path = os.path.join(here, name)
            with open(os.path.join(tmp, name)) as f:
                new_head, new = numbers(f.read().splitlines())
            with open(path) as f:
                old_head, old = numbers(f.read().splitlines())
            if new_head != old_head or len(new) != len(old):
                print("%s: columns or row count changed (%d rows, now %d)" % (path, len(old), len(new)))
                bad += 1
                continue
            drift = 0
            for a, b in zip(old, new):
                for x, y in zip(a, b):
                    if abs(x - y) > rel_tol * max(abs(x), abs(y)):
                        print("%s: row %r: %r, regenerated %r" % (path, a[:2], x, y))
                        drift += 1
            if drift:
                print("%s: %d numbers drifted" % (path, drift))
                bad += 1
            else:
                print("%s: %d rows, no drift" % (path, len(old)))
    return 1 if bad else 0


def main(argv, doc, here, files, rel_tol, write_to=None):
    """The generator scripts' command line: no argument writes the fixture into
    here, --check compares (check); anything else prints the script's doc."""
    write_to = write_to or (lambda d: write(d, files))
    if argv[1:] == ["--check"]:
        return check(here, files, rel_tol, write_to)
    if argv[1:]:
        print(doc)
        return 2
    write_to(here)
    return 0
