"""The client claims Python 3.9+ but the machine runs a newer python3: every module of the package and the
example is parsed with the 3.9 grammar and searched for the constructs and standard-library names
that 3.9 lacks (each with the version that added it, from the "What's New in Python 3.x" pages, from memory)."""
import ast
import io
import os
import tokenize
import unittest

HERE = os.path.dirname(os.path.abspath(__file__))
CLIENT = os.path.abspath(os.path.join(HERE, ".."))
TARGET = (3, 9)

NEWER_MODULES = {"tomllib": "3.11", "wsgiref.types": "3.11"}
# (module, name): the version that added it; matched as `module.name` and as `from module import name`
NEWER_NAMES = {
    ("datetime", "UTC"): "3.11", ("itertools", "pairwise"): "3.10", ("itertools", "batched"): "3.12",
    ("hashlib", "file_digest"): "3.11", ("math", "cbrt"): "3.11", ("math", "exp2"): "3.11", ("math", "sumprod"): "3.12",
    ("contextlib", "chdir"): "3.11", ("contextlib", "aclosing"): "3.10", ("enum", "StrEnum"): "3.11",
    ("asyncio", "TaskGroup"): "3.11", ("asyncio", "timeout"): "3.11", ("operator", "call"): "3.11",
    ("types", "NoneType"): "3.10", ("types", "UnionType"): "3.10", ("types", "EllipsisType"): "3.10",
    ("inspect", "get_annotations"): "3.10", ("statistics", "correlation"): "3.10", ("statistics", "covariance"): "3.10",
    ("statistics", "linear_regression"): "3.10", ("sys", "orig_argv"): "3.10", ("sys", "stdlib_module_names"): "3.10",
    ("http", "HTTPMethod"): "3.11", ("logging", "getLevelNamesMapping"): "3.11",
    ("typing", "TypeAlias"): "3.10", ("typing", "ParamSpec"): "3.10", ("typing", "Concatenate"): "3.10",
    ("typing", "TypeGuard"): "3.10", ("typing", "Self"): "3.11", ("typing", "Never"): "3.11",
    ("typing", "LiteralString"): "3.11", ("typing", "assert_never"): "3.11", ("typing", "reveal_type"): "3.11",
    ("typing", "Required"): "3.11", ("typing", "NotRequired"): "3.11", ("typing", "override"): "3.12",
}
NEWER_BUILTINS = {"aiter": "3.10", "anext": "3.10", "EncodingWarning": "3.10", "ExceptionGroup": "3.11",
                  "BaseExceptionGroup": "3.11"}
# method names distinctive enough to flag on any object (int.bit_count, BaseException.add_note, Path.walk is not)
NEWER_METHODS = {"bit_count": "3.10", "add_note": "3.11", "hardlink_to": "3.10", "is_junction": "3.12"}
# (callable's name, keyword): keyword arguments added later than the callable
NEWER_KEYWORDS = {("zip", "strict"): "3.10", ("dataclass", "slots"): "3.10", ("dataclass", "kw_only"): "3.10",
                  ("dataclass", "match_args"): "3.10", ("bisect_left", "key"): "3.10", ("bisect_right", "key"): "3.10",
                  ("insort_left", "key"): "3.10", ("insort_right", "key"): "3.10", ("glob", "root_dir"): "3.10",
                  ("glob", "dir_fd"): "3.10", ("fromisoformat", "tz"): "3.11"}


def _has_bitor(node: ast.AST) -> bool:
    return any(isinstance(n, ast.BinOp) and isinstance(n.op, ast.BitOr) for n in ast.walk(node))


def _parenthesized_with(source: str):
    """Lines of `with (a as b, c as d):` — the 3.10 form, which the 3.9 grammar flag of ast.parse lets through
    (CPython's parser accepted it unofficially from 3.9). `with (a) as b:` and `with (a):` stay allowed."""
    toks = [t for t in tokenize.generate_tokens(io.StringIO(source).readline)
            if t.type not in (tokenize.NL, tokenize.COMMENT, tokenize.NEWLINE)]
    lines = []
    for i, t in enumerate(toks[:-1]):
        if not (t.type == tokenize.NAME and t.string == "with" and toks[i + 1].string == "("):
            continue
        depth, j, inner = 0, i + 1, False
        while j < len(toks):
            s = toks[j].string
            depth += s in "([{" and toks[j].type == tokenize.OP
            depth -= s in ")]}" and toks[j].type == tokenize.OP
            if depth == 1 and (s == "," or (s == "as" and toks[j].type == tokenize.NAME)):
                inner = True
            if depth == 0:
                break
            j += 1
        if inner and j + 1 < len(toks) and toks[j + 1].string == ":":
            lines.append(t.start[0])
    return lines


def problems_for_39(source: str, name: str = "<source>"):
    """What in `source` Python 3.9 cannot run, as 'name:line: what (3.x)' strings; empty when none."""
    try:
        tree = ast.parse(source, filename=name, feature_version=TARGET)
    except SyntaxError as e:
        return ["%s:%s: %s" % (name, e.lineno, e.msg)]
    found = ["%s:%d: parenthesized context managers (3.10)" % (name, n) for n in _parenthesized_with(source)]
    postponed = any(isinstance(n, ast.ImportFrom) and n.module == "__future__" and any(a.name == "annotations" for a in n.names)
                    for n in tree.body)
    aliases = {}
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                aliases[a.asname or a.name] = a.name

    def flag(node, what, version):
        found.append("%s:%d: %s (%s)" % (name, node.lineno, what, version))

    # annotations of defs, and of assignments outside functions, are evaluated when the line runs
    def annotations(body, in_function):
        for node in body:
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                a = node.args
                for arg in a.posonlyargs + a.args + a.kwonlyargs + [x for x in (a.vararg, a.kwarg) if x]:
                    if arg.annotation is not None and _has_bitor(arg.annotation):
                        flag(arg, "`X | Y` annotation of %s evaluated at def time" % arg.arg, "3.10")
                if node.returns is not None and _has_bitor(node.returns):
                    flag(node, "`X | Y` return annotation of %s evaluated at def time" % node.name, "3.10")
                annotations(node.body, True)
            elif isinstance(node, ast.ClassDef):
                annotations(node.body, in_function)
            elif isinstance(node, ast.AnnAssign) and not in_function and _has_bitor(node.annotation):
                flag(node, "`X | Y` variable annotation evaluated at run time", "3.10")
            else:
                for field in ("body", "orelse", "finalbody", "handlers"):
                    annotations(getattr(node, field, []) or [], in_function)

    if not postponed:
        annotations(tree.body, False)
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                if a.name in NEWER_MODULES:
                    flag(node, "module %s" % a.name, NEWER_MODULES[a.name])
        elif isinstance(node, ast.ImportFrom) and node.module:
            if node.module in NEWER_MODULES:
                flag(node, "module %s" % node.module, NEWER_MODULES[node.module])
            for a in node.names:
                if (node.module, a.name) in NEWER_NAMES:
                    flag(node, "%s.%s" % (node.module, a.name), NEWER_NAMES[(node.module, a.name)])
        elif isinstance(node, ast.Attribute):
            if isinstance(node.value, ast.Name):
                key = (aliases.get(node.value.id, node.value.id), node.attr)
                if key in NEWER_NAMES:
                    flag(node, "%s.%s" % key, NEWER_NAMES[key])
            if node.attr in NEWER_METHODS:
                flag(node, ".%s()" % node.attr, NEWER_METHODS[node.attr])
        elif isinstance(node, ast.Name) and node.id in NEWER_BUILTINS:
            flag(node, "builtin %s" % node.id, NEWER_BUILTINS[node.id])
        elif isinstance(node, ast.Call):
            callee = node.func.id if isinstance(node.func, ast.Name) else getattr(node.func, "attr", None)
            for kw in node.keywords:
                if (callee, kw.arg) in NEWER_KEYWORDS:
                    flag(node, "%s(%s=)" % (callee, kw.arg), NEWER_KEYWORDS[(callee, kw.arg)])
            if callee in ("isinstance", "issubclass") and len(node.args) == 2 and _has_bitor(node.args[1]):
                flag(node, "%s() with an `X | Y` type" % callee, "3.10")
    return sorted(set(found))


def client_sources():
    """Every .py a user of the client runs: the package and the examples."""
    out = []
    for sub in ("rillscale", "examples"):
        for dirpath, _dirs, files in os.walk(os.path.join(CLIENT, sub)):
            out += [os.path.join(dirpath, f) for f in sorted(files) if f.endswith(".py")]
    return out


# One newer construct per sample; each must be flagged (derived from the version notes above).
NEWER_SAMPLES = [
    "match x:\n    case 1:\n        pass\n",
    "try:\n    pass\nexcept* ValueError:\n    pass\n",
    "with (open('a') as f, open('b') as g):\n    pass\n",
    "with (open('a') as f):\n    pass\n",
    "def f(x: int | None) -> None:\n    pass\n",
    "def f(x) -> 'int' | None:\n    pass\n",
    "class A:\n    x: int | None = None\n",
    "isinstance(1, int | str)\n",
    "list(zip([1], [2], strict=True))\n",
    "import datetime\nnow = datetime.datetime.now(datetime.UTC)\n",
    "import datetime as dt\nnow = dt.UTC\n",
    "from datetime import UTC\n",
    "import tomllib\n",
    "from typing import Self\n",
    "import itertools\nitertools.pairwise([1, 2])\n",
    "(5).bit_count()\n",
    "x = anext(it)\n",
    "import hashlib\nhashlib.file_digest(f, 'sha256')\n",
    "from dataclasses import dataclass\n@dataclass(slots=True)\nclass A:\n    pass\n",
]
# 3.9 runs each of these: the checker must not flag them
ALLOWED_SAMPLES = [
    "from __future__ import annotations\ndef f(x: int | None) -> dict[str, int] | None:\n    pass\n",
    "def f():\n    y: int | None = None\n",
    "with (open('a')) as f, open('b') as g:\n    pass\n",
    "with (open('a')):\n    pass\n",
    "x = {'a': 1} | {'b': 2}\ny = 'rs-x'.removeprefix('rs-')\nz = list[int]\n",
    "def f(x: 'int | None') -> 'str | None':\n    pass\n",
    "flags = 1 | 2\nisinstance(1, (int, str))\n",
]


class Runs_on_python_3_9(unittest.TestCase):
    def test_the_checker_flags_each_construct_python_3_9_lacks(self):
        for sample in NEWER_SAMPLES:
            self.assertTrue(problems_for_39(sample), "not flagged:\n" + sample)

    def test_the_checker_leaves_what_python_3_9_runs(self):
        for sample in ALLOWED_SAMPLES:
            self.assertEqual(problems_for_39(sample), [], sample)

    def test_every_module_of_the_client_parses_with_the_3_9_grammar_and_uses_nothing_newer(self):
        files = client_sources()
        self.assertGreaterEqual(len(files), 4, files)  # package (3 modules), example
        found = []
        for path in files:
            with open(path, encoding="utf-8") as f:
                found += problems_for_39(f.read(), os.path.relpath(path, CLIENT))
        self.assertEqual(found, [])


if __name__ == "__main__":
    unittest.main()
