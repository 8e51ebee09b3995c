"""End to end: a small campaign through `haloledger report`, its JSON ledger read back and
checked against a hand calculation.

Hand figures use CIAAW 2021 standard atomic weights (abridged): H 1.008, C 12.011, N 14.007,
O 15.999, Na 22.990, Cl 35.45, Br 79.904.  With the formula route (all H alike) and an
over-halogenation factor of 1, the batch degree distribution is binomial (design section 4):
x_n = C(N, n) p^n (1 - p)^(N - n) with p = mean degree / N.
"""
import json, math, os, subprocess, sys, tempfile

BIN = os.environ["HALOLEDGER"]
W = {"H": 1.008, "C": 12.011, "N": 14.007, "O": 15.999, "Na": 22.990, "Cl": 35.45, "Br": 79.904}
fails = []


def check(cond, what):
    if not cond:
        fails.append(what)


def close(a, b, rel=1e-9, what=""):
    ok = abs(a - b) <= rel * max(abs(b), 1e-300)
    check(ok, f"{what}: got {a!r}, expected {b!r}")


CAMPAIGN = {
    "format": "haloledger-campaign/1",
    "title": "hand calculation",
    "site": "test bench",
    "scrubbers": [{"id": "S1", "liquor": "naoh", "naoh_wt_pct": 20, "liquor_kg": 5000,
                   "min_naoh_wt_pct": 2, "rated_acid_kmol_h": 5, "fresh_liquor_temp_c": 0,
                   "max_liquor_temp_c": 150}],
    "stock": [{"reagent": "Cl2", "on_hand_kg": 0, "safety_kg": 0, "lead_days": 10}],
    "containers": [{"reagent": "Cl2", "name": "test drum", "net_kg": 50, "heel_kg": 5}],
    "runs": [
        {"id": "P-1", "start": "2027-03-02T06:00", "reactor": "R1", "scrubber": "S1",
         "substrate": {"name": "propane", "formula": "C3H8"}, "substrate_kg": 100,
         "reagent": "Cl2", "reagent_eq": 0.5, "halogen_conversion": 1.0, "temp_c": 25,
         "feed_h": 4},
        {"id": "I-1", "start": "2027-03-05T06:00", "reactor": "R1", "scrubber": "S1",
         "substrate": {"name": "2-methylpropane", "smiles": "CC(C)C"}, "substrate_kg": 58.122,
         "reagent": "Cl2", "reagent_eq": 0.01, "halogen_conversion": 1.0},
        # more H than the 64-step chain: the step constants still fall as (82 - n)
        {"id": "T-1", "start": "2027-03-08T06:00", "reactor": "R1",
         "substrate": {"name": "tetracontane", "formula": "C40H82"}, "substrate_kg": 100,
         "reagent": "Cl2", "reagent_eq": 20, "halogen_conversion": 1.0, "temp_c": 25,
         "feed_h": 8},
    ],
}

with tempfile.TemporaryDirectory() as d:
    camp = os.path.join(d, "hand.json")
    out = os.path.join(d, "hand-ledger.json")
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f, indent=1)
    p = subprocess.run([BIN, "report", camp, "-o", out], capture_output=True, text=True)
    check(p.returncode == 0, f"report exit {p.returncode}: {p.stderr}")
    L = json.load(open(out)) if p.returncode == 0 else {"runs": [], "orders": [], "months": []}

check(L.get("format") == "haloledger-ledger/1", "format key")
runs = {r["id"]: r for r in L["runs"]}
# every run must be there: a missing one is a failure, not a set of checks that vanish
for rid in ("P-1", "I-1", "T-1"):
    check(rid in runs, f"run {rid} missing from the ledger")
if "P-1" in runs:
    r = runs["P-1"]
    m_propane = 3 * W["C"] + 8 * W["H"]
    n_sub = 100e3 / m_propane
    m_cl2 = 2 * W["Cl"]
    n_cl2 = 0.5 * n_sub
    close(r["substrate"]["molar_mass_g_mol"], m_propane, 1e-12, "propane molar mass")
    close(r["substrate"]["mol"], n_sub, 1e-12, "propane mol")
    close(r["reagent_charged"]["mol"], n_cl2, 1e-12, "Cl2 charged mol")
    close(r["reagent_charged"]["kg"], n_cl2 * m_cl2 / 1e3, 1e-12, "Cl2 charged kg")
    close(r["halogen_reacted_mol"], n_cl2, 1e-12, "Cl2 reacted = charged x conversion")
    m_hcl = W["H"] + W["Cl"]
    # RH + Cl2 -> RCl + HCl: HCl formed = Cl2 reacted
    close(r["byproducts"]["HCl_kg"], n_cl2 * m_hcl / 1e3, 1e-12, "HCl formed = Cl2 reacted")
    close(r["vent"]["HCl_mol"], n_cl2, 1e-12, "HCl to vent")
    close(r["vent"]["Cl2_mol"], 0.0 + 1e-300, 1.0, "no Cl2 to vent at full conversion")
    close(r["vent"]["acid_kmol_h"], n_cl2 / 1e3 / 4, 1e-9, "acid gas rate = vented / feed_h")
    m_naoh = W["Na"] + W["O"] + W["H"]
    close(r["scrubber"]["naoh_kg"], n_cl2 * m_naoh / 1e3, 1e-9, "NaOH = HCl mol x M(NaOH)")
    # binomial degree distribution, N = 8 H, p = 0.5 / 8
    N, p_ = 8, 0.5 / 8
    by_deg = {}
    for pr in r["products"]:
        by_deg[pr["degree"]] = by_deg.get(pr["degree"], 0) + pr["mol_fraction"]
    for n in range(0, 4):
        close(by_deg.get(n, 0), math.comb(N, n) * p_**n * (1 - p_) ** (N - n), 1e-9,
              f"binomial degree {n}")
    check(r["element_balance"]["max_rel_error"] <= 1e-9, "element closure <= 1e-9")
    roles = sorted(pr["role"] for pr in r["products"])
    check("unreacted" in roles and "wanted" in roles and "overhalogenated" in roles, f"roles {roles}")
if "I-1" in runs:
    # 2-methylpropane at 25 C, Cl2 per-H 1 : 5.0 primary : tertiary (Morrison & Boyd):
    # isobutyl chloride 9 x 1 / (9 + 5) = 64.3 %, tert-butyl chloride 5 / 14 = 35.7 %.
    mono = [pr for pr in runs["I-1"]["products"] if pr["degree"] == 1]
    tot = sum(pr["mol"] for pr in mono)
    shares = sorted(pr["mol"] / tot for pr in mono) if tot else []
    check(len(shares) == 2, f"two monochlorides, got {len(shares)}")
    if len(shares) == 2:
        close(shares[0], 5 / 14, 1e-9, "tert-butyl chloride share")
        close(shares[1], 9 / 14, 1e-9, "isobutyl chloride share")
    check(runs["I-1"]["element_balance"]["max_rel_error"] <= 1e-9, "element closure I-1")

if "T-1" in runs:
    # binomial with N = 82 H, p = 20/82 (all H alike, phi = 1): the peak degree to 1e-9,
    # degree 0 (1e-10 of the moles) to the solver's absolute accuracy
    N, p_ = 82, 20 / 82
    by_deg = {}
    for pr in runs["T-1"]["products"]:
        by_deg[pr["degree"]] = by_deg.get(pr["degree"], 0) + pr["mol_fraction"]
    close(by_deg.get(20, 0), math.comb(N, 20) * p_**20 * (1 - p_) ** 62, 1e-9, "C40H82 degree 20")
    close(by_deg.get(0, 0), (1 - p_) ** N, 1e-4, "C40H82 degree 0")
# I-1 leaves temp_c and feed_h to their defaults (25 C, 1 h): both are named in a warning;
# P-1 gives them, so it gets neither
defaulted = [(w["run"], w["message"]) for w in L.get("warnings", []) if "not given" in w["message"]]
check(("I-1" in {r for r, m in defaulted if m.startswith("temp_c")}) and
      ("I-1" in {r for r, m in defaulted if m.startswith("feed_h")}), f"default warnings {defaulted}")
check(not any(r == "P-1" for r, m in defaulted), f"P-1 gave its values: {defaulted}")
# a formula substrate cannot resolve isomers; a SMILES one does
check(runs.get("P-1", {}).get("isomers_resolved") is False, "P-1 (formula) isomers_resolved false")
check(runs.get("I-1", {}).get("isomers_resolved") is True, "I-1 (SMILES) isomers_resolved true")
if "P-1" in runs:
    # fresh liquor at 0 C (given, not the 25 C default): the first run starts from 0 C
    sc = runs["P-1"]["scrubber"]
    close(sc["liquor_temp_c_after"], sc["temp_rise_k"], 1e-12, "liquor from a 0 C fresh charge")

# orders: demand of both runs; 45 kg usable per drum; order-by = first use - 10 days
cl2 = [o for o in L["orders"] if o["reagent"] == "Cl2"]
check(len(cl2) == 1, "one Cl2 order line")
if cl2 and "P-1" in runs and "I-1" in runs:
    o = cl2[0]
    demand = sum(runs[k]["reagent_charged"]["kg"] for k in ("P-1", "I-1", "T-1") if k in runs)
    close(o["demand_kg"], demand, 1e-9, "Cl2 demand")
    check(o["containers"] == math.ceil(demand / 45.0), f"containers {o['containers']}")
    check(o["order_by"].startswith("2027-02-20"), f"order_by {o['order_by']}")
    check(o["container"] == "test drum", "container name")

# a writer that fails (file-size limit, as a full disk does) on the first of two outputs:
# the message names that output, not its staged temporary, and nothing is left behind
import resource, signal


def small_files():
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (4096, 4096))


with tempfile.TemporaryDirectory() as d:
    camp = os.path.join(d, "hand.json")
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f)
    a, b = os.path.join(d, "first.json"), os.path.join(d, "second.xlsx")
    p = subprocess.run([BIN, "report", camp, "-o", a, "-o", b], capture_output=True, text=True,
                       preexec_fn=small_files)
    check(p.returncode == 1, f"file-size limit: exit {p.returncode}")
    check(a in p.stderr and ".tmp" not in p.stderr, f"file-size limit message: {p.stderr.strip()}")
    check(sorted(os.listdir(d)) == ["hand.json"], f"left behind: {sorted(os.listdir(d))}")

if fails:
    print("\n".join(fails))
    print(f"ledger_hand_calc: {len(fails)} failures")
    sys.exit(1)
print("ledger_hand_calc: all checks passed")
