"""Shared by the end-to-end scripts (tests/run.sh skips files starting with "_"):
where the binary is, how runs are wrapped (HL_WRAP, e.g. valgrind), and a check tally."""
import os
import shlex

ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BUILD = os.environ.get("BUILD", "build")
BIN = os.environ.get("HALOLEDGER") or os.path.join(ROOT, BUILD, "haloledger")
WRAP = shlex.split(os.environ.get("HL_WRAP", ""))
# Reference ledgers of the JSON writer (tests/data/ledger-ref) and the folder of each campaign
REF = os.path.join(ROOT, "tests", "data", "ledger-ref")
SOURCES = {"harrowmere-march": "campaigns", "harrowmere-nbs-hbr": "campaigns",
           "small-scrubber-stress": "campaigns", "overlap-two-month": "tests/campaigns",
           "text-escapes": "tests/campaigns"}
# CIAAW 2021 standard atomic weights, abridged (conventional) values
CIAAW = {"H": 1.008, "C": 12.011, "N": 14.007, "O": 15.999, "Na": 22.990, "S": 32.06,
         "Cl": 35.45, "Br": 79.904}


class Tally:
    """Counts checks and keeps the failed ones; check() returns the condition."""

    def __init__(self):
        self.n = 0
        self.fails = []

    def check(self, cond, what):
        self.n += 1
        if not cond:
            self.fails.append(what)
        return cond
