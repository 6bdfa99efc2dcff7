"""The client's PEP 517 build backend (PEP 427 wheel, PEP 517 sdist), standard library only.

In-tree (pyproject.toml `backend-path`) so that `pip install ./clients/python` needs nothing but pip, offline, on
any Python 3.9+: setuptools before 70.1 cannot build a wheel without the separate `wheel` package, and pip's
isolated build would fetch both from the network. The package's metadata lives here (tomllib, which could read
pyproject.toml, is 3.11+); the version is the one `rillscale/__init__.py` states.
"""
import ast
import base64
import hashlib
import io
import os
import tarfile
import zipfile

HERE = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
PACKAGE = "rillscale"
SUMMARY = "A small client for the Rillscale API: upload DEMs and stream networks, run analyses, fetch results"
REQUIRES_PYTHON = ">=3.9"
LICENSE = "Proprietary"
# zip and tar entries get one fixed time, so the same sources build byte-identical archives
EPOCH = (1980, 1, 1, 0, 0, 0)


def _version() -> str:
    with open(os.path.join(HERE, PACKAGE, "__init__.py"), encoding="utf-8") as f:
        tree = ast.parse(f.read())
    for node in tree.body:
        if isinstance(node, ast.Assign) and any(isinstance(t, ast.Name) and t.id == "__version__" for t in node.targets):
            return ast.literal_eval(node.value)
    raise RuntimeError("rillscale/__init__.py states no __version__")


def _metadata(version: str) -> bytes:
    with open(os.path.join(HERE, "README.md"), encoding="utf-8") as f:
        readme = f.read()
    head = ["Metadata-Version: 2.1", "Name: " + PACKAGE, "Version: " + version, "Summary: " + SUMMARY,
            "License: " + LICENSE, "Requires-Python: " + REQUIRES_PYTHON, "Description-Content-Type: text/markdown"]
    return ("\n".join(head) + "\n\n" + readme).encode("utf-8")


def _package_files():
    """(path in the archive, absolute path) of every module of the package, sorted."""
    root = os.path.join(HERE, PACKAGE)
    names = sorted(n for n in os.listdir(root) if n.endswith(".py"))
    return [(PACKAGE + "/" + n, os.path.join(root, n)) for n in names]


def _record_line(name: str, data: bytes) -> str:
    digest = base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode("ascii")
    return "%s,sha256=%s,%d" % (name, digest, len(data))


def get_requires_for_build_wheel(config_settings=None):
    return []


def get_requires_for_build_sdist(config_settings=None):
    return []


def build_wheel(wheel_directory, config_settings=None, metadata_directory=None):
    version = _version()
    dist_info = "%s-%s.dist-info" % (PACKAGE, version)
    entries = []
    for name, path in _package_files():
        with open(path, "rb") as f:
            entries.append((name, f.read()))
    entries.append((dist_info + "/METADATA", _metadata(version)))
    entries.append((dist_info + "/WHEEL", b"Wheel-Version: 1.0\nGenerator: rillscale_build\nRoot-Is-Purelib: true\nTag: py3-none-any\n"))
    record = "".join(_record_line(n, d) + "\n" for n, d in entries) + dist_info + "/RECORD,,\n"
    entries.append((dist_info + "/RECORD", record.encode("utf-8")))
    filename = "%s-%s-py3-none-any.whl" % (PACKAGE, version)
    with zipfile.ZipFile(os.path.join(wheel_directory, filename), "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in entries:
            info = zipfile.ZipInfo(name, EPOCH)
            info.external_attr = 0o644 << 16
            info.compress_type = zipfile.ZIP_DEFLATED
            z.writestr(info, data)
    return filename


def build_sdist(sdist_directory, config_settings=None):
    version = _version()
    base = "%s-%s" % (PACKAGE, version)
    sources = [("pyproject.toml", os.path.join(HERE, "pyproject.toml")), ("README.md", os.path.join(HERE, "README.md")),
               ("_build/rillscale_build.py", os.path.abspath(__file__))] + _package_files()
    filename = base + ".tar.gz"
    with tarfile.open(os.path.join(sdist_directory, filename), "w:gz", format=tarfile.PAX_FORMAT) as t:
        for name, data in [("PKG-INFO", _metadata(version))] + [(n, open(p, "rb").read()) for n, p in sources]:
            info = tarfile.TarInfo(base + "/" + name)
            info.size = len(data)
            info.mode = 0o644
            info.mtime = 315532800  # EPOCH as a Unix time
            t.addfile(info, io.BytesIO(data))
    return filename
