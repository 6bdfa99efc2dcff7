"""`pip install ./clients/python`, offline (--no-index --no-build-isolation, with Debian's pip, setuptools and wheel):
the package imports from where pip put it, its metadata is the one stated, every file matches its RECORD hash, and
the example script runs its --help on the installed package. The sdist builds and installs too. Both build from a
copy of the directory, so setuptools' build folders never land in the checkout."""
import base64
import csv
import hashlib
import json
import os
import shutil
import subprocess
import sys
import tempfile
import unittest

HERE = os.path.dirname(os.path.abspath(__file__))
CLIENT = os.path.abspath(os.path.join(HERE, ".."))
EXAMPLE = os.path.join(CLIENT, "examples", "run_analysis.py")
# Debian's interpreter sees Debian's python3-pip/-setuptools/-wheel (scripts/bootstrap.sh installs them in test
# mode); a python3 earlier on PATH (pyenv) may lack wheel, which setuptools before 70.1 needs to build one.
BUILDER = "/usr/bin/python3" if os.path.exists("/usr/bin/python3") else sys.executable
PACKAGES = "python3-pip, python3-setuptools and python3-wheel"
# run in the child with only the install directory on its path: imports the installed package, then runs the example
PROBE = """
import json, runpy, sys
sys.argv = [sys.argv[1], "--help"]
try:
    runpy.run_path(sys.argv[0], run_name="__main__")
    code = None
except SystemExit as e:
    code = e.code
import rillscale
print(json.dumps({"exit": code, "file": rillscale.__file__, "version": rillscale.__version__,
                  "table": rillscale.order_table({"summary": {"horton": {"table": [{"order": 1, "streamCount": 3}]}}})}))
"""


def pip(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([BUILDER, "-m", "pip", "--disable-pip-version-check", "--no-input", *args],
                          capture_output=True, text=True, timeout=300)


def source_copy(into: str) -> str:
    """The client directory without its tests and caches, as `pip install ./clients/python` reads it."""
    dest = os.path.join(into, "src")
    shutil.copytree(CLIENT, dest, ignore=shutil.ignore_patterns("tests", "__pycache__", "*.egg-info", "build", "dist"))
    return dest


def child_env(path: str):
    env = {k: v for k, v in os.environ.items() if not k.startswith("PYTHON")}
    env.update(PYTHONPATH=path, PYTHONNOUSERSITE="1", PYTHONDONTWRITEBYTECODE="1")
    return env


def pip_install(test: unittest.TestCase, what: str, target: str):
    probe = subprocess.run([BUILDER, "-c", "import setuptools, wheel, pip"], capture_output=True, text=True)
    if probe.returncode != 0:
        test.fail("%s lacks pip, setuptools or wheel: install Debian's %s (scripts/bootstrap.sh does in test mode)\n%s"
                  % (BUILDER, PACKAGES, probe.stderr[-500:]))
    run = pip("install", "--no-deps", "--no-build-isolation", "--no-index", "--target", target, what)
    test.assertEqual(run.returncode, 0, run.stdout[-2000:] + run.stderr[-2000:])


def record_hash(data: bytes) -> str:
    return "sha256=" + base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode("ascii")


class Installs_with_pip(unittest.TestCase):
    def test_pip_installs_the_directory_offline_and_the_package_imports_from_the_install(self):
        with tempfile.TemporaryDirectory() as d:
            target = os.path.join(d, "site")
            pip_install(self, source_copy(d), target)
            run = subprocess.run([sys.executable, "-c", PROBE, EXAMPLE], cwd=target, env=child_env(target),
                                 capture_output=True, text=True, timeout=60)
            self.assertEqual(run.returncode, 0, run.stderr[-2000:])
            out = json.loads(run.stdout.strip().splitlines()[-1])
            self.assertEqual(out["exit"], 0)
            self.assertIn("DEM", run.stdout)  # argparse's usage line names the positional argument
            self.assertTrue(out["file"].startswith(os.path.join(target, "rillscale") + os.sep), out["file"])
            self.assertEqual(out["version"], "0.1.0")
            self.assertEqual(out["table"], [{"order": 1, "stream_count": 3, "mean_length_m": None, "mean_area_km2": None, "mean_slope_m_per_m": None}])

            info = os.path.join(target, "rillscale-0.1.0.dist-info")
            with open(os.path.join(info, "METADATA"), encoding="utf-8") as f:
                head = dict(l.split(": ", 1) for l in f.read().split("\n\n", 1)[0].splitlines())
            self.assertEqual((head["Name"], head["Version"], head["Requires-Python"]), ("rillscale", "0.1.0", ">=3.9"))
            with open(os.path.join(info, "RECORD"), newline="", encoding="utf-8") as f:
                record = {row[0]: row[1] for row in csv.reader(f)}
            modules = sorted(n for n in os.listdir(os.path.join(CLIENT, "rillscale")) if n.endswith(".py"))
            for name in modules:
                path = "rillscale/" + name
                self.assertIn(path, record)
                with open(os.path.join(target, path), "rb") as f:
                    installed = f.read()
                with open(os.path.join(CLIENT, path), "rb") as f:
                    self.assertEqual(installed, f.read(), path)
                self.assertEqual(record[path], record_hash(installed), path)

    def test_the_sdist_builds_offline_and_pip_installs_it(self):
        # the PEP 517 hook pip itself calls, on the backend pyproject.toml names
        build = "import sys; from setuptools import build_meta; print(build_meta.build_sdist(sys.argv[1]))"
        with tempfile.TemporaryDirectory() as d:
            src = source_copy(d)
            made = subprocess.run([BUILDER, "-c", build, d], cwd=src, capture_output=True, text=True, timeout=120)
            self.assertEqual(made.returncode, 0, made.stderr[-2000:])
            sdist = os.path.join(d, made.stdout.strip().splitlines()[-1])
            self.assertEqual(os.path.basename(sdist), "rillscale-0.1.0.tar.gz")
            target = os.path.join(d, "site")
            pip_install(self, sdist, target)
            run = subprocess.run([sys.executable, "-c", "import rillscale; print(rillscale.__file__)"], cwd=d,
                                 env=child_env(target), capture_output=True, text=True, timeout=60)
            self.assertEqual(run.returncode, 0, run.stderr[-2000:])
            self.assertTrue(run.stdout.strip().startswith(os.path.join(target, "rillscale") + os.sep), run.stdout)


if __name__ == "__main__":
    unittest.main()
