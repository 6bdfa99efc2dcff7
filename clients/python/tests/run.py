#!/usr/bin/env python3
"""Runs the client's tests (unittest) and writes {"passed": n, "failed": n} to the path given.

The server tests need a started stack: with RILLSCALE_TEST_URL and RILLSCALE_TEST_KEY set they use it,
otherwise this script starts one (tests/serve_stack.ts, the integration suites' own harness) and stops it.
"""
import json
import os
import subprocess
import sys
import threading
import unittest

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.abspath(os.path.join(HERE, "..", "..", ".."))
sys.path.insert(0, os.path.join(HERE, ".."))
sys.path.insert(0, HERE)
MARK = "RILLSCALE_TEST_STACK"


class Tally(unittest.TextTestResult):
    passed = 0

    def addSuccess(self, test):
        super().addSuccess(test)
        self.passed += 1


def main() -> int:
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, ".data", "test-results", "python.json")
    stack = None
    if not os.environ.get("RILLSCALE_TEST_URL") or not os.environ.get("RILLSCALE_TEST_KEY"):
        stack = subprocess.Popen(["npx", "tsx", "--conditions=react-server", os.path.join(HERE, "serve_stack.ts")],
                                 cwd=ROOT, stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
        info = None
        for line in stack.stdout:  # build and cluster messages come first; pass them on
            if line.startswith(MARK + " "):
                info = json.loads(line[len(MARK) + 1:])
                break
            sys.stderr.write(line)
        if info is None:
            stack.wait()
            os.makedirs(os.path.dirname(out), exist_ok=True)
            with open(out, "w") as f:
                json.dump({"passed": 0, "failed": 1}, f)
            print("python: the test stack did not start", file=sys.stderr)
            return 1
        # keep draining the stack's output so it never blocks on a full pipe
        threading.Thread(target=lambda: [sys.stderr.write(l) for l in stack.stdout], daemon=True).start()
        os.environ["RILLSCALE_TEST_URL"] = info["url"]
        os.environ["RILLSCALE_TEST_KEY"] = info["key"]
    try:
        suite = unittest.defaultTestLoader.discover(HERE, pattern="test_*.py", top_level_dir=HERE)
        result = unittest.TextTestRunner(verbosity=2, resultclass=Tally).run(suite)
        failed = len(result.failures) + len(result.errors) + len(result.unexpectedSuccesses)
        tally = {"passed": result.passed, "failed": failed}
    finally:
        if stack is not None:
            stack.stdin.close()
            try:
                stack.wait(timeout=60)
            except subprocess.TimeoutExpired:
                stack.kill()
    os.makedirs(os.path.dirname(out), exist_ok=True)
    with open(out, "w") as f:
        json.dump(tally, f)
    print("python: %d passed, %d failed" % (tally["passed"], tally["failed"]))
    return 0 if tally["failed"] == 0 and tally["passed"] > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
