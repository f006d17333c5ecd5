# SPDX-License-Identifier: MIT
"""Shared by the umbra-cli test drivers: arguments UMBRA_CLI WORKDIR CASE, check(), run(),
and main() running case_<CASE> from the caller's module."""
import subprocess
import sys

CLI, WORK, CASE = sys.argv[1], sys.argv[2], sys.argv[3]
FAILURES = []


def check(cond, what):
    if not cond:
        FAILURES.append(what)
        print("FAIL:", what)


def run(*args, timeout=120):
    p = subprocess.run([CLI, *args], capture_output=True, text=True, timeout=timeout)
    return p.returncode, p.stdout, p.stderr


def main(cases, cleanup=None):
    try:
        cases["case_" + CASE]()
    finally:
        if cleanup:
            cleanup()
    if FAILURES:
        print(f"{len(FAILURES)} check(s) failed")
        sys.exit(1)
    print("all checks passed")
