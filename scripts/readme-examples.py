#!/usr/bin/env python3
"""Re-run the example commands of README.md and put their real output back.

Every fenced block whose first line starts with "$ mixdepth" is an example:
each "$ ..." line in it is run (from a scratch directory, with the binary
built from this checkout) and the block is rewritten as the commands followed
by what they printed. Usage: python3 scripts/readme-examples.py
"""
import os
import re
import subprocess
import sys
import tempfile

root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
work = tempfile.mkdtemp(prefix="mixdepth-readme-")
binary = os.path.join(work, "mixdepth")
# Examples name the project's fixtures by relative path, as a user in a
# checkout would; everything else they write stays in the scratch directory.
os.symlink(os.path.join(root, "fixtures"), os.path.join(work, "fixtures"))
subprocess.run(["go", "build", "-o", binary, "./cmd/mixdepth"], cwd=root, check=True)

readme = open(os.path.join(root, "README.md")).read()
fence = re.compile(r"```\n(\$ mixdepth.*?)```\n", re.S)


def rerun(match):
    commands = [l[2:] for l in match.group(1).splitlines() if l.startswith("$ ")]
    out = []
    for cmd in commands:
        run = subprocess.run("mixdepth" + cmd[len("mixdepth"):], shell=True, cwd=work,
                             capture_output=True, text=True,
                             env=dict(os.environ, PATH=work + os.pathsep + os.environ["PATH"]))
        if run.returncode != 0:
            sys.exit(f"{cmd}: exit {run.returncode}\n{run.stderr}")
        out.append("$ " + cmd + "\n" + run.stdout.rstrip("\n") + "\n")
        print(cmd, file=sys.stderr)
    return "```\n" + "\n".join(out) + "```\n"


# Every example runs before the README is touched, and the new text replaces
# it atomically, so a failing example leaves the README as it was.
text = fence.sub(rerun, readme)
tmp = os.path.join(root, ".README.md.tmp")
with open(tmp, "w") as f:
    f.write(text)
os.replace(tmp, os.path.join(root, "README.md"))
