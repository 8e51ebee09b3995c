#!/usr/bin/python3
"""acceptance_scrubber.py - scrubber load in time, liquor life, caustic and halogen orders, strict
mode, --today and the cautions of `check`, through the real binary.

Campaigns: campaigns/small-scrubber-stress.json (demo) and tests/campaigns/overlap-two-month.json
(two runs of exactly 2 kmol HCl each on one scrubber, 06:00-08:00 and 07:00-09:00, then runs that
force changeouts in March and April, so stock is carried from month to month).
Everything below is recomputed here from the campaign file alone (hand calculation):
  * vent moles: RH + Cl2 -> RCl + HCl, HCl = Cl2 reacted, Cl2 vented = charged x (1 - conversion);
  * load profile: each run vents at amount / feed_h x peak_factor over [start, start + feed_h /
    peak_factor] (the amount is conserved, contract in include/scrubber.h), binned by clock hour;
    overlapping runs add; peak, peak hour (earliest on a tie);
  * instantaneous peak: the largest sum of the rates of the runs venting at one moment, found
    here by brute force at every window start (a window ending at the minute another starts
    does not overlap it); overloaded = instantaneous peak > rated (a rating is an
    instantaneous limit, include/scrubber.h);
  * liquor: NaOH per mol gas HCl 1, HBr 1, Cl2 2, Br2 2, SO2 2 (design section 4), M(NaOH) =
    39.997 g/mol (CIAAW 2021 abridged: Na 22.990, O 15.999, H 1.008); liquor mass grows by the gas
    absorbed; runs whose vent windows chain into each other form a group, and a changeout
    (fresh charge) comes before a group that would take used liquor below min_naoh_wt_pct
    (the unit is idle only between groups); a run that still crosses the limit is exhausted;
  * liquor temperature (when the ledger carries it): no cooling, so each run's rise adds to the
    temperature of the liquor since the last fresh charge at 25 C; too hot above 40 C; heat
    duty = heat / vent window (feed_h / peak_factor);
  * heats: HCl(g) + NaOH(aq) -130.7 kJ/mol, Cl2 + 2 NaOH -100.1 kJ/mol (values derived from the
    NBS tables of chemical thermodynamic properties, as quoted in the ledger issue), 0.1 %;
  * caustic make-up: liquor_kg x naoh_wt_pct / 50 wt% per changeout (design: 50 wt% by default);
  * orders (design section 4): to order = demand + safety - stock carried; containers =
    ceil(to order / (net - heel)); order-by = first use - lead days; stock carried = stock at start
    + containers x (net - heel) - demand;
  * --strict: exit 3 with a warning (overload, late order), 0 without; --today flags late orders;
  * `haloledger check` prints one short caution line per substance the ledger lists (with the
    NIOSH REL of the ledger's own table) and the deferral to SDS / regulations / licensed engineer.
Env: HALOLEDGER, HL_ROOT, BUILD, HL_WRAP.
"""
import datetime as dt
import json
import math
import os
import re
import subprocess
import sys
import tempfile
import time

from _hl import BIN, CIAAW, WRAP, Tally

T0 = time.time()
ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
W = CIAAW  # CIAAW 2021 standard atomic weights, abridged
M_NAOH = W["Na"] + W["O"] + W["H"]                     # 39.997 g/mol
GAS_M = {"HCl": W["H"] + W["Cl"], "HBr": W["H"] + W["Br"], "Cl2": 2 * W["Cl"], "Br2": 2 * W["Br"],
         "SO2": W["S"] + 2 * W["O"]}
NAOH_PER = {"HCl": 1, "HBr": 1, "Cl2": 2, "Br2": 2, "SO2": 2}   # design section 4 liquor reactions
HEAT = {"HCl": 130.7, "Cl2": 100.1}                              # kJ/mol released, see docstring

TALLY = Tally()
check = TALLY.check
fails = TALLY.fails


def rel(a, b, tol, what):
    return check(a is not None and b is not None and abs(a - b) <= tol * max(abs(b), 1e-300),
                 f"{what}: got {a!r}, hand {b!r}")


def run(args):
    p = subprocess.run(WRAP + [BIN] + args, capture_output=True, text=True)
    return p


def report(camp_path, out, extra=()):
    p = run(["report", camp_path, "-o", out] + list(extra))
    led = None
    if p.returncode in (0, 3):
        # a run that reports success must leave its ledger: the checks guarded by "if led" below
        # would otherwise vanish without a failure
        if check(os.path.exists(out), f"report {os.path.basename(camp_path)}: exit {p.returncode} but no {out}"):
            with open(out) as f:
                led = json.load(f)
    return p, led


def parse_t(s):
    return dt.datetime.fromisoformat(s)


def formula_mass(f):
    return sum(W[e] * (int(n) if n else 1) for e, n in re.findall(r"([A-Z][a-z]?)(\d*)", f))


def smiles_mass_simple(smi):
    """Molar mass of a saturated acyclic alkane SMILES (only C atoms, branches): CnH2n+2."""
    n = smi.count("C")
    return n * W["C"] + (2 * n + 2) * W["H"]


def expand(camp):
    """Runs with repeat expanded (ids -1, -2 ...), hand vent moles, in start order (stable)."""
    out = []
    for i, r in enumerate(camp["runs"]):
        rep = r.get("repeat")
        count = rep["count"] if rep else 1
        for k in range(count):
            q = dict(r)
            q["id"] = f"{r['id']}-{k + 1}" if rep else r["id"]
            t = parse_t(r["start"]) + dt.timedelta(days=(rep["every_days"] * k if rep else 0))
            q["t0"] = t
            q["order"] = (t, i, k)
            sub = r["substrate"]
            msub = formula_mass(sub["formula"]) if "formula" in sub else smiles_mass_simple(sub["smiles"])
            n_sub = r["substrate_kg"] * 1e3 / msub
            assert r["reagent"] == "Cl2", "hand model here covers Cl2 runs only"
            n_cl2 = r["reagent_eq"] * n_sub if "reagent_eq" in r else r["reagent_kg"] * 1e3 / GAS_M["Cl2"]
            conv = r.get("halogen_conversion", 1.0)
            q["vent"] = {"HCl": n_cl2 * conv, "Cl2": n_cl2 * (1 - conv)}
            q["cl2_kg"] = n_cl2 * GAS_M["Cl2"] / 1e3
            out.append(q)
    out.sort(key=lambda q: q["order"])
    return out


def hourly(runs, rated):
    """Clock-hour bins [kmol/h] from the earliest start: (hour0, list)."""
    t0 = min(q["t0"] for q in runs).replace(minute=0, second=0)
    bins = {}
    for q in runs:
        pf = q.get("peak_factor", 1.0)
        amount = sum(q["vent"].values()) / 1e3                      # kmol
        rate = amount / q["feed_h"] * pf                             # kmol/h
        a = (q["t0"] - t0).total_seconds() / 3600
        b = a + q["feed_h"] / pf
        h = math.floor(a)
        while h < b:
            lo, hi = max(a, h), min(b, h + 1)
            bins[h] = bins.get(h, 0.0) + rate * (hi - lo)
            h += 1
    n = max(bins) + 1
    return t0, [bins.get(h, 0.0) for h in range(n)]


def window(q):
    """Vent window [start, end) of a run (datetimes)."""
    return q["t0"], q["t0"] + dt.timedelta(hours=q["feed_h"] / q.get("peak_factor", 1.0))


def instant(runs):
    """Instantaneous peak by brute force: the load only rises at a window start, so evaluate
    the sum of the runs venting at every start (start <= t < end). -> (kmol/h, at, ids)."""
    best, at, ids = 0.0, None, []
    for t in sorted({q["t0"] for q in runs}):
        on = [q for q in runs if window(q)[0] <= t < window(q)[1] and sum(q["vent"].values()) > 0]
        load = sum(sum(q["vent"].values()) / 1e3 / q["feed_h"] * q.get("peak_factor", 1.0) for q in on)
        if load > best * (1 + 1e-12):
            best, at, ids = load, t, [q["id"] for q in on]
    return best, at, ids


def groups(runs):
    """Runs split into groups whose vent windows chain into each other (start order)."""
    out, busy = [], None
    for q in runs:
        if busy is None or q["t0"] >= busy:
            out.append([])
            busy = window(q)[1]
        busy = max(busy, window(q)[1])
        out[-1].append(q)
    return out


def liquor(runs, sc):
    """Hand liquor track: per run (changeout_before, naoh_kg, heat_kj, naoh_left_kg, liquor_kg,
    short, out): short = the run takes the liquor below min_naoh_wt_pct (exhausted flag) after
    the group decision; out = NaOH runs out during the run (then only the NaOH left is used)."""
    fresh_naoh = sc["liquor_kg"] * sc["naoh_wt_pct"] / 100
    naoh, mass, dirty = fresh_naoh, sc["liquor_kg"], False
    res = {}

    def need(qs):
        use = sum(NAOH_PER[g] * n for q in qs for g, n in q["vent"].items()) * M_NAOH / 1e3
        gain = sum(GAS_M[g] * n for q in qs for g, n in q["vent"].items()) / 1e3
        return use, gain

    for grp in groups(runs):
        use, gain = need(grp)
        co = dirty and use > 0 and (naoh - use) / (mass + gain) * 100 < sc["min_naoh_wt_pct"]
        if co:
            naoh, mass, dirty = fresh_naoh, sc["liquor_kg"], False
        for k, q in enumerate(grp):
            use, gain = need([q])
            heat = sum(HEAT[g] * n for g, n in q["vent"].items())
            short = use > 0 and (naoh - use) / (mass + gain) * 100 < sc["min_naoh_wt_pct"]
            out = use > naoh
            if out:
                use = naoh
            naoh -= use
            mass += gain
            dirty = dirty or gain > 0
            res[q["id"]] = (co and k == 0, use, heat, naoh, mass, short, out)
    return res


def order_plan(demands, stock, cont):
    """demands: {month: (kg, first_use datetime)} for one item -> {month: line dict}."""
    s = stock.get("on_hand_kg", 0.0)
    safety, lead = stock.get("safety_kg", 0.0), stock.get("lead_days", 0)
    usable = cont["net_kg"] - cont["heel_kg"]
    out = {}
    for m in sorted(demands):
        kg, first = demands[m]
        to_order = kg + safety - s
        n = math.ceil(to_order / usable - 1e-12) if to_order > 0 else 0
        end = s + n * usable - kg
        out[m] = {"stock_start_kg": s, "to_order_kg": to_order, "containers": n, "stock_end_kg": end,
                  "order_by": (first.date() - dt.timedelta(days=math.ceil(lead))).isoformat(),
                  "demand_kg": kg}
        s = end
    return out


CATALOG = {"Cl2": {"name": "ton container", "net_kg": 907, "heel_kg": 9},
           "NaOH": {"name": "50 wt% caustic IBC", "net_kg": 1500, "heel_kg": 15}}   # templates/containers.json


def check_campaign(tag, camp_path, tmp, expect_overload):
    with open(camp_path) as f:
        camp = json.load(f)
    out = os.path.join(tmp, tag + ".ledger.json")  # never the campaign itself (refused, issue 8.4)
    p, led = report(camp_path, out)
    if not check(p.returncode == 0 and led is not None, f"{tag}: report exit {p.returncode}: {p.stderr.strip()}"):
        return None
    runs = expand(camp)
    R = {r["id"]: r for r in led["runs"]}
    check([r["id"] for r in led["runs"]] == [q["id"] for q in runs], f"{tag}: run ids/order {list(R)}")
    for sc in camp["scrubbers"]:
        mine = [q for q in runs if q.get("scrubber") == sc["id"]]
        S = [s for s in led["scrubbers"] if s["id"] == sc["id"]]
        if not check(len(S) == 1, f"{tag}: scrubber {sc['id']} missing"):
            continue
        S = S[0]
        # ---- vent moles and rate per run
        for q in mine:
            r = R[q["id"]]
            for g, n in q["vent"].items():
                rel(r["vent"][g + "_mol"], n, 1e-12, f"{tag} {q['id']} vent.{g}_mol")
            rel(r["vent"]["acid_kmol_h"], sum(q["vent"].values()) / 1e3 / q["feed_h"] * q.get("peak_factor", 1.0),
                1e-12, f"{tag} {q['id']} acid_kmol_h")
        # ---- hourly peak
        h0, prof = hourly(mine, sc["rated_acid_kmol_h"])
        peak = max(prof)
        at = next(i for i, v in enumerate(prof) if v >= peak * (1 - 1e-12))
        rel(S["peak_acid_kmol_h"], peak, 1e-12, f"{tag} {sc['id']} peak_acid_kmol_h")
        check(S["peak_at"] == (h0 + dt.timedelta(hours=at)).strftime("%Y-%m-%dT%H:%M"),
              f"{tag} {sc['id']} peak_at {S['peak_at']} != {(h0 + dt.timedelta(hours=at)).isoformat()}")
        check(S["rated_acid_kmol_h"] == sc["rated_acid_kmol_h"], f"{tag} rated")
        ipeak, iat, iruns = instant(mine)
        check(S["overloaded"] == (ipeak > sc["rated_acid_kmol_h"]) == expect_overload,
              f"{tag} {sc['id']} overloaded {S['overloaded']} (instantaneous peak {ipeak}, rated {sc['rated_acid_kmol_h']})")
        if check("peak_instant_kmol_h" in S, f"{tag} key peak_instant_kmol_h missing from the ledger"):
            rel(S["peak_instant_kmol_h"], ipeak, 1e-12, f"{tag} {sc['id']} peak_instant_kmol_h")
            check(S.get("peak_instant_at") == iat.strftime("%Y-%m-%dT%H:%M"),
                  f"{tag} {sc['id']} peak_instant_at {S.get('peak_instant_at')} != {iat}")
            if check("peak_instant_runs" in S, f"{tag} key peak_instant_runs missing from the ledger"):
                check(sorted(S["peak_instant_runs"]) == sorted(iruns), f"{tag} peak_instant_runs {S['peak_instant_runs']} != {iruns}")
        if check("hourly" in S, f"{tag} key hourly missing from the ledger"):
            hp = S["hourly"]["kmol_h"]
            check(S["hourly"]["start"] == h0.strftime("%Y-%m-%dT%H:%M"), f"{tag} hourly.start {S['hourly']['start']}")
            check(all(abs(a - b) <= 1e-12 * max(1, abs(b)) for a, b in zip(hp, prof)) and
                  all(v == 0 for v in hp[len(prof):]) and len(hp) >= len(prof),
                  f"{tag} hourly profile differs from hand profile")
        if expect_overload:
            check(any(sc["id"] in w["message"] for w in led["warnings"]), f"{tag}: no overload warning naming {sc['id']}")
            check(sc["id"] in p.stderr and "overload" in p.stderr.lower(), f"{tag}: no overload warning on stderr")
        # ---- liquor track, NaOH, changeouts
        track = liquor(mine, sc)
        nco = 0
        temp = sc.get("fresh_liquor_temp_c") or 25.0
        hottest = temp
        first_of_group = {g[0]["id"] for g in groups(mine)}
        for q in mine:
            co, use, heat, naoh_left, mass, short, out = track[q["id"]]
            r = R[q["id"]]["scrubber"]
            nco += co
            if check("liquor_temp_c_after" in r, f"{tag} key liquor_temp_c_after missing from the ledger"):
                # adiabatic track: the rises add up within a group of overlapping runs; the
                # idle unit (and every fresh charge) is back at 25 C before the next group
                fresh = sc.get("fresh_liquor_temp_c") or 25.0
                temp = fresh if (co or q["id"] in first_of_group) else temp
                temp += r["temp_rise_k"]
                hottest = max(hottest, temp)
                rel(r["liquor_temp_c_after"], temp, 1e-9, f"{tag} {q['id']} liquor_temp_c_after")
                check(bool(r.get("too_hot")) == (temp > (sc.get("max_liquor_temp_c") or 40.0)),
                      f"{tag} {q['id']} too_hot {r.get('too_hot')} at {temp:.1f} C")
                if not out:
                    w = window(q)
                    rel(r["heat_kw"], heat / (w[1] - w[0]).total_seconds(), 1e-3, f"{tag} {q['id']} heat_kw")
            check(r["changeout_before"] == co, f"{tag} {q['id']} changeout_before {r['changeout_before']}, hand {co}")
            rel(r["naoh_kg"], use, 1e-12, f"{tag} {q['id']} scrubber.naoh_kg")
            if check("exhausted" in r, f"{tag} key exhausted missing from the ledger"):
                check(bool(r["exhausted"]) == short, f"{tag} {q['id']} exhausted {r['exhausted']}, hand {short}")
            if short:
                check(any(w["run"] == q["id"] and sc["id"] in w["message"] for w in led["warnings"]),
                      f"{tag} {q['id']}: liquor short mid-run but no warning for the run")
            if out:
                check(r.get("naoh_left_kg") == 0, f"{tag} {q['id']} naoh_left_kg {r.get('naoh_left_kg')} after running out")
                continue
            rel(r["heat_kj"], heat, 1e-3, f"{tag} {q['id']} scrubber.heat_kj (NBS-table heats)")
            if check("naoh_left_kg" in r, f"{tag} key naoh_left_kg missing from the ledger"):
                rel(r["naoh_left_kg"], naoh_left, 1e-9, f"{tag} {q['id']} naoh_left_kg")
                rel(r["liquor_kg_after"], mass, 1e-12, f"{tag} {q['id']} liquor_kg_after")
                rel(r["naoh_wt_pct_after"], naoh_left / mass * 100, 1e-9, f"{tag} {q['id']} naoh_wt_pct_after")
                check(r["naoh_wt_pct_after"] >= sc["min_naoh_wt_pct"] or r.get("exhausted"),
                      f"{tag} {q['id']} ends at {r['naoh_wt_pct_after']} wt% < min without a warning")
        check(S["changeouts"] == nco, f"{tag} {sc['id']} changeouts {S['changeouts']}, hand {nco}")
        if check("max_liquor_temp_c" in S, f"{tag} key max_liquor_temp_c missing from the ledger"):
            rel(S["max_liquor_temp_c"], hottest, 1e-9, f"{tag} {sc['id']} max_liquor_temp_c")
        rel(S["naoh_kg"], sum(track[q["id"]][1] for q in mine), 1e-12, f"{tag} {sc['id']} naoh_kg")
        makeup_each = sc["liquor_kg"] * sc["naoh_wt_pct"] / sc.get("makeup_naoh_wt_pct", 50)
        if check("makeup_kg" in S, f"{tag} key makeup_kg missing from the ledger"):
            rel(S["makeup_kg"], nco * makeup_each, 1e-12, f"{tag} {sc['id']} makeup_kg")
    # ---- months: changeouts, NaOH
    months = {m["month"]: m for m in led["months"]}
    by_m = {}
    for q in runs:
        by_m.setdefault(q["t0"].strftime("%Y-%m"), []).append(q)
    sc0 = camp["scrubbers"][0]
    track = liquor([q for q in runs if q.get("scrubber") == sc0["id"]], sc0)
    makeup_each = sc0["liquor_kg"] * sc0["naoh_wt_pct"] / sc0.get("makeup_naoh_wt_pct", 50)
    check(set(months) == set(by_m), f"{tag}: months {sorted(months)} != {sorted(by_m)}")
    naoh_dem, cl2_dem = {}, {}
    for m, qs in by_m.items():
        if m not in months:
            continue
        co = [q for q in qs if track[q["id"]][0]]
        check(months[m]["changeouts"] == len(co), f"{tag} {m} changeouts {months[m]['changeouts']} != {len(co)}")
        rel(months[m]["naoh_kg"], sum(track[q["id"]][1] for q in qs), 1e-12, f"{tag} {m} naoh_kg")
        rel(months[m]["vent_kg"]["HCl"], sum(q["vent"]["HCl"] for q in qs) * GAS_M["HCl"] / 1e3, 1e-12, f"{tag} {m} vent HCl kg")
        rel(months[m]["reagents_kg"]["Cl2"], sum(q["cl2_kg"] for q in qs), 1e-12, f"{tag} {m} Cl2 kg")
        cl2_dem[m] = (sum(q["cl2_kg"] for q in qs), min(q["t0"] for q in qs))
        if co:
            naoh_dem[m] = (len(co) * makeup_each, min(q["t0"] for q in co))
    # ---- orders
    stock = {s["reagent"]: s for s in camp.get("stock", [])}
    conts = dict(CATALOG)
    for c in camp.get("containers", []):
        conts[c["reagent"]] = c
    O = {(o["month"], o["reagent"]): o for o in led["orders"]}
    for item, dem in (("Cl2", cl2_dem), ("NaOH", naoh_dem)):
        plan = order_plan(dem, stock.get(item, {}), conts[item])
        for m, want in plan.items():
            o = O.get((m, item))
            if not check(o is not None, f"{tag}: no order line {m} {item} (caustic make-up: {item == 'NaOH'})"):
                continue
            for k in ("demand_kg", "stock_start_kg", "to_order_kg", "stock_end_kg"):
                if k in o:
                    check(abs(o[k] - want[k]) <= 1e-9 * max(1, abs(want[k])), f"{tag} {m} {item} {k} {o[k]!r}, hand {want[k]!r}")
            check(o["containers"] == want["containers"], f"{tag} {m} {item} containers {o['containers']}, hand {want['containers']}")
            check(o["container"] == conts[item]["name"], f"{tag} {m} {item} container {o['container']!r}")
            check(o["order_by"] == want["order_by"], f"{tag} {m} {item} order_by {o['order_by']}, hand {want['order_by']}")
        # stock carried: next month's start = start + containers x usable - demand (design section 5)
        ms = sorted(m for (m, it) in O if it == item)
        usable = conts[item]["net_kg"] - conts[item]["heel_kg"]
        for a, b in zip(ms, ms[1:]):
            oa, ob = O[(a, item)], O[(b, item)]
            carried = oa["stock_start_kg"] + oa["containers"] * usable - oa["demand_kg"]
            check(abs(ob["stock_start_kg"] - carried) <= 1e-9 * max(1, carried),
                  f"{tag} {item} stock_start {b} {ob['stock_start_kg']} != carried {carried}")
    items = {it for (_, it) in O}
    check("Cl2" in items and (not naoh_dem or "NaOH" in items), f"{tag}: orders {sorted(O)} lack Cl2 or caustic NaOH")
    check(not ("NaOH" in items and not naoh_dem), f"{tag}: caustic ordered without a changeout")
    return led


def check_cautions(tag, camp_path, led, want_formulas):
    p = run(["check", camp_path])
    check(p.returncode == 0, f"{tag}: check exit {p.returncode}: {p.stderr.strip()}")
    out = p.stdout
    lines = out.splitlines()
    got = set()
    for c in led["cautions"]:
        inner = re.search(r"\(([^)]*)\)", c["substance"])
        toks = [t.strip() for t in inner.group(1).split(",")] if inner else []
        forms = [t for t in toks if re.fullmatch(r"[A-Z][A-Za-z0-9]*", t)]
        if not check(forms, f"{tag}: caution {c['substance']!r} names no formula"):
            continue
        f = forms[0]
        got.add(f)
        line = [ln for ln in lines if re.match(r"\s*-\s*" + re.escape(f) + r"\b", ln)]
        if not check(len(line) == 1, f"{tag}: check prints {len(line)} short caution lines for {f}"):
            continue
        rel_ = [x for x in c["limits"] if x["kind"] == "NIOSH REL"]
        if rel_ and "none" not in rel_[0]["value"]:
            short = re.split(r" \(|, ", rel_[0]["value"])[0]
            check(short in line[0], f"{tag}: {f} short caution {line[0]!r} lacks NIOSH REL {short!r}")
        idlh = [x for x in c["limits"] if x["kind"] == "IDLH"]
        if idlh and "none" not in idlh[0]["value"] and "IDLH" in line[0]:
            # the short form need not carry the IDLH, but when it does it is the table's value
            check("IDLH " + idlh[0]["value"] in line[0], f"{tag}: {f} short caution IDLH differs from {idlh[0]['value']!r}")
    check(got >= set(want_formulas), f"{tag}: cautions {sorted(got)} lack {sorted(set(want_formulas) - got)}")
    low = out.lower()
    check("safety data sheet" in low or "sds" in low, f"{tag}: check output does not defer to the SDS")
    check("regulation" in low, f"{tag}: check output does not name local regulations")
    check("licensed engineer" in low, f"{tag}: check output does not defer to a licensed engineer")


def main():
    stress = os.path.join(ROOT, "campaigns", "small-scrubber-stress.json")
    overlap = os.path.join(ROOT, "tests", "campaigns", "overlap-two-month.json")
    with tempfile.TemporaryDirectory() as tmp:
        led_s = check_campaign("stress", stress, tmp, expect_overload=True)
        if led_s:
            # the numbers of the practitioner review: MB-1 0.693 + PR-1 1.020 kmol/h overlap
            # 07:30-08:50, instantaneous 1.713 kmol/h; the hourly bins peak at 1.543
            R = {r["id"]: r for r in led_s["runs"]}
            S = led_s["scrubbers"][0]
            mb, pr = R["MB-1"]["vent"]["acid_kmol_h"], R["PR-1"]["vent"]["acid_kmol_h"]
            check(abs(mb - 0.693) < 5e-4 and abs(pr - 1.020) < 5e-4, f"stress: MB-1 {mb}, PR-1 {pr} kmol/h")
            check(abs(S["peak_acid_kmol_h"] - 1.543) < 5e-4, f"stress: hourly peak {S['peak_acid_kmol_h']} != 1.543")
            if check("peak_instant_kmol_h" in S, f"main: key peak_instant_kmol_h missing from the ledger"):
                check(abs(S["peak_instant_kmol_h"] - (mb + pr)) <= 1e-12 * (mb + pr) and
                      S.get("peak_instant_at") == "2027-05-03T07:30",
                      f"stress: instantaneous peak {S['peak_instant_kmol_h']} at {S.get('peak_instant_at')}")
            # issue 8 item 7: MB-1 and PR-1 heat the liquor together from 07:30, about 61 kW,
            # where the old warning quoted the largest single run (36 kW)
            # (each run's own duty, heat / vent window, is checked by hand in test_scrubber)
            duty = {i: R[i]["scrubber"]["heat_kw"] for i in ("MB-1", "PR-1")}
            check(abs(S.get("peak_heat_kw", 0) - sum(duty.values())) <= 1e-9 * sum(duty.values()) and
                  60 < S.get("peak_heat_kw", 0) < 62 and S.get("peak_heat_at") == "2027-05-03T07:30" and
                  sorted(S.get("peak_heat_runs", [])) == ["MB-1", "PR-1"],
                  f"stress: peak heat {S.get('peak_heat_kw')} at {S.get('peak_heat_at')} from "
                  f"{S.get('peak_heat_runs')}, want MB-1 + PR-1 = {sum(duty.values()):.2f} kW at 07:30")
        # harrowmere-march: TC-5 and EB-2 both start 2027-03-18T06:00; deciding for the pair, the
        # changeout comes before TC-5 and EB-2 stays above 2 wt% (one run ahead it fell to 0.62)
        hm = os.path.join(ROOT, "campaigns", "harrowmere-march.json")
        p, led_h = report(hm, os.path.join(tmp, "harrowmere.json"))
        if check(p.returncode == 0 and led_h, f"harrowmere-march: report exit {p.returncode}: {p.stderr.strip()}"):
            R = {r["id"]: r["scrubber"] for r in led_h["runs"]}
            check(R["TC-5"]["changeout_before"] and not R["EB-2"]["changeout_before"] and
                  not R["EB-2"].get("exhausted") and R["EB-2"]["naoh_wt_pct_after"] >= 2,
                  f"harrowmere-march: TC-5 {R['TC-5']}, EB-2 {R['EB-2']}")
            # combined heat release (issue 8 item 7): runs venting at once heat the liquor
            # together; brute force at every window start, each run's duty = heat_kj / window
            runs_h = [{"id": r["id"], "t0": parse_t(r["start"]), "feed_h": r["feed_h"],
                       "peak_factor": r.get("peak_factor", 1.0), "kw": None, "kj": r["scrubber"]["heat_kj"]}
                      for r in led_h["runs"]]
            best, at, ids = 0.0, None, []
            for t in sorted({q["t0"] for q in runs_h}):
                on = [q for q in runs_h if window(q)[0] <= t < window(q)[1] and q["kj"] > 0]
                kw = sum(q["kj"] / (q["feed_h"] / q["peak_factor"] * 3600) for q in on)
                if kw > best * (1 + 1e-12):
                    best, at, ids = kw, t, [q["id"] for q in on]
            S = led_h["scrubbers"][0]
            check(S.get("peak_heat_kw") is not None and abs(S["peak_heat_kw"] - best) <= 1e-9 * best and
                  S.get("peak_heat_at") == at.strftime("%Y-%m-%dT%H:%M") and S.get("peak_heat_runs") == ids,
                  f"harrowmere-march: peak heat {S.get('peak_heat_kw')} at {S.get('peak_heat_at')} "
                  f"{S.get('peak_heat_runs')}, brute force {best} at {at} {ids}")
            pair = sum(R[i]["heat_kj"] / (8 * 3600 if i == "EB-2" else 6 * 3600) for i in ("TC-5", "EB-2"))
            check(60 < pair < 63 and S.get("peak_heat_kw", 0) >= pair,
                  f"harrowmere-march: TC-5 + EB-2 together {pair:.1f} kW (about 61), peak {S.get('peak_heat_kw')}")
            cool = [w["message"] for w in led_h["warnings"] if "cooling" in w["message"]]
            check(len(cool) == 1 and f"{best:.0f} kW" in cool[0] and all(i in cool[0] for i in ids),
                  f"harrowmere-march: cooling warning does not quote the combined peak {best:.0f} kW: {cool}")
            pc = run(["check", hm])
            check(f"peak heat release {best:.1f} kW" in pc.stdout,
                  f"harrowmere-march: check prints no peak heat release line of {best:.1f} kW")
        led_o = check_campaign("overlap", overlap, tmp, expect_overload=True)
        if led_o:
            # the numbers a reader can check on paper (see the campaign's note)
            S = led_o["scrubbers"][0]
            check(abs(S["peak_acid_kmol_h"] - 2.0) <= 1e-12, f"overlap: peak {S['peak_acid_kmol_h']} != 2 kmol/h")
            check(S["peak_at"] == "2027-03-10T07:00", f"overlap: peak_at {S['peak_at']}")
            if check("peak_runs" in S, f"main: key peak_runs missing from the ledger"):
                check(sorted(S["peak_runs"]) == ["OV-A", "OV-B"], f"overlap: peak_runs {S['peak_runs']}")
            check(S["changeouts"] == 2, f"overlap: changeouts {S['changeouts']} != 2")
            R = {r["id"]: r for r in led_o["runs"]}
            check([R[i]["scrubber"]["changeout_before"] for i in ("OV-A", "OV-B", "OV-C", "OV-D", "OV-E")] ==
                  [False, False, True, False, True], "overlap: changeout_before pattern")
            check(abs(R["OV-A"]["scrubber"]["naoh_kg"] - 79.994) <= 1e-9, f"overlap: NaOH per run {R['OV-A']['scrubber']['naoh_kg']} != 2000 x 39.997 g")
            O = {(o["month"], o["reagent"]): o for o in led_o["orders"]}
            want = {("2027-03", "Cl2"): (6, "2027-02-28"), ("2027-04", "Cl2"): (5, "2027-03-26"),
                    ("2027-03", "NaOH"): (3, "2027-03-04"), ("2027-04", "NaOH"): (2, "2027-03-30")}
            for k, (n, by) in want.items():
                o = O.get(k)
                check(o is not None and o["containers"] == n and o["order_by"] == by,
                      f"overlap order {k}: {o and (o['containers'], o['order_by'])} != {(n, by)}")
            if ("2027-04", "NaOH") in O:
                check(abs(O[("2027-04", "NaOH")]["stock_start_kg"] - 235) <= 1e-9, "overlap: NaOH stock carried into April != 235 kg")
                check(abs(O[("2027-04", "Cl2")]["stock_start_kg"] - 23.6) <= 1e-9, "overlap: Cl2 stock carried into April != 23.6 kg")

        # ---- variants of the overlap campaign, each checked in full by the hand model above
        with open(overlap) as f:
            base = json.load(f)

        def variant(name, fn, overload):
            c = json.loads(json.dumps(base))
            fn(c)
            path = os.path.join(tmp, name + ".json")
            with open(path, "w") as f:
                json.dump(c, f)
            return check_campaign(name, path, tmp, expect_overload=overload)

        def touching(c):        # B starts when A stops: the windows do not add
            c["runs"][1]["start"] = "2027-03-10T08:00"
        led = variant("touching", touching, False)
        if led:
            check(led["scrubbers"][0]["peak_acid_kmol_h"] == 1.0, f"touching: peak {led['scrubbers'][0]['peak_acid_kmol_h']} != 1")

        # issue 16 item 1: 2 kmol HCl over feed_h 1e-8 h is 2e8 kmol/h against 1.5: a safety
        # check never fails open - refused as input (2) or flagged as an overload (3), never 0
        c = json.loads(json.dumps(base))
        c["runs"][3]["feed_h"] = 1e-8
        path = os.path.join(tmp, "tiny-feed.json")
        with open(path, "w") as f:
            json.dump(c, f)
        p = run(["check", "--strict", path])
        check(p.returncode in (2, 3), f"tiny feed_h: check --strict exit {p.returncode}, want 2 or 3")
        if p.returncode == 3:
            check("overloaded" in p.stderr and "OV-D" in p.stderr,
                  f"tiny feed_h: no overload warning naming OV-D: {p.stderr.strip()!r}")

        # issue 8 item 6: a liquor reaching its boiling point is an alarm of its own.  Water
        # liquor (basis: water boils at 100 C at 1 atm), 1000 kg at 25 C, one run venting n mol
        # HCl (Cl2 all reacted: HCl = Cl2 charged), 74.852 kJ/mol (NBS 1982: -167.159 + 92.307),
        # cp of fresh water 4.18 kJ/(kg K): 4900 mol -> 25 + 366775 / (1178.65 x 4.18) = 99.44 C,
        # below; 5000 mol -> 100.73 C, boils.  No other warning: --strict exits 0, then 3.
        for n_mol, boils in ((4900, False), (5000, True)):
            c = json.loads(json.dumps(base))
            c["scrubbers"] = [{"id": "VS-W", "liquor": "water", "liquor_kg": 1000, "max_acid_wt_pct": 30,
                               "max_liquor_temp_c": 150, "rated_acid_kmol_h": 100}]
            c["runs"] = [dict(c["runs"][0], id="BW-1", scrubber="VS-W", reagent_kg=n_mol * GAS_M["Cl2"] / 1000)]
            c["runs"][0].pop("reagent_eq", None)
            path = os.path.join(tmp, f"boil-{n_mol}.json")
            with open(path, "w") as f:
                json.dump(c, f)
            p = run(["check", "--strict", path])
            hot = 25 + n_mol * 74.852 / ((1000 + n_mol * GAS_M["HCl"] / 1000) * 4.18)
            msg = [ln for ln in p.stderr.splitlines() if "would boil" in ln]
            if boils:
                check(p.returncode == 3 and len(msg) == 1 and "BW-1" in msg[0] and f"{hot:.0f} C" in msg[0]
                      and "100 C" in msg[0], f"boil {n_mol} mol ({hot:.2f} C): exit {p.returncode}, {msg}")
            else:
                check(p.returncode == 0 and not msg, f"boil {n_mol} mol ({hot:.2f} C, below 100): exit "
                      f"{p.returncode}, {p.stderr.strip()!r}")

        def half(c):            # B from 07:30: 07:00 hour holds 1 + 0.5 = 1.5 = rated, not over it,
            c["runs"][1]["start"] = "2027-03-10T07:30"   # but 07:30-08:00 runs at 2 > 1.5: overloaded
        led = variant("half-hour", half, True)
        if led:
            S = led["scrubbers"][0]
            check(S["peak_acid_kmol_h"] == 1.5 and S["peak_at"] == "2027-03-10T07:00",
                  f"half-hour: peak {S['peak_acid_kmol_h']} at {S['peak_at']}")
            if check("peak_instant_kmol_h" in S, f"main: key peak_instant_kmol_h missing from the ledger"):
                check(S["peak_instant_kmol_h"] == 2.0 and S.get("peak_instant_at") == "2027-03-10T07:30",
                      f"half-hour: instantaneous peak {S['peak_instant_kmol_h']} at {S.get('peak_instant_at')}")

        def exhaust(c):         # 150 kg NaOH: A leaves 70.006 kg, B (overlapping, no changeout) runs out
            c["scrubbers"][0]["liquor_kg"] = 1500
            c["runs"] = c["runs"][:3]
        led = variant("exhaust", exhaust, True)
        if led:
            R = {r["id"]: r["scrubber"] for r in led["runs"]}
            check(R["OV-B"].get("exhausted") is True and not R["OV-B"]["changeout_before"]
                  and abs(R["OV-B"]["naoh_kg"] - 70.006) <= 1e-9 and R["OV-C"]["changeout_before"],
                  f"exhaust: OV-B {R['OV-B']}, OV-C changeout {R['OV-C']['changeout_before']}")

        def short(c):           # 200 kg NaOH: A + B would end at 1.86 wt% < 2; fresh: B flagged
            c["scrubbers"][0]["liquor_kg"] = 2000
            c["runs"] = c["runs"][:3]
        variant("short", short, True)

        def multiple(c):        # to order 141.8 + 41.2 - 50 = 133 kg = exactly 2 x 66.5 kg usable
            c["runs"] = c["runs"][:1]
            c["stock"][0] = {"reagent": "Cl2", "on_hand_kg": 50, "safety_kg": 41.2, "lead_days": 10}
        led = variant("multiple", multiple, False)
        if led:
            o = [o for o in led["orders"] if o["reagent"] == "Cl2"]
            check(o and o[0]["containers"] == 2, f"multiple: {o and o[0]['containers']} containers for exactly 2 x usable")

        # ---- strict mode and --today
        for tag, path in (("stress", stress), ("overlap", overlap)):
            out = os.path.join(tmp, tag + "-strict.json")
            p = run(["report", path, "--strict", "-o", out])
            check(p.returncode == 3, f"{tag}: --strict with an overload exit {p.returncode}, want 3")
            check(os.path.exists(out), f"{tag}: --strict exit 3 but the ledger was not written")
            p = run(["report", path, "-o", out])
            check(p.returncode == 0, f"{tag}: overload without --strict exit {p.returncode}, want 0")
        # the same overlap campaign on a scrubber rated 5 kmol/h: no warning unless an order is late
        with open(overlap) as f:
            camp = json.load(f)
        camp["scrubbers"][0]["rated_acid_kmol_h"] = 5
        camp["scrubbers"][0]["max_liquor_temp_c"] = 150  # a cooled unit: no cooling warning
        big = os.path.join(tmp, "overlap-rated5.json")
        with open(big, "w") as f:
            json.dump(camp, f)
        out = os.path.join(tmp, "big.json")
        p, led = report(big, out, ["--strict"])
        check(p.returncode == 0, f"rated 5: --strict without warnings exit {p.returncode}: {p.stderr.strip()}")
        if led:
            check(not led["scrubbers"][0]["overloaded"], "rated 5: overloaded")
            check(led["warnings"] == [], f"rated 5: warnings {led['warnings']}")
        p, led = report(big, out, ["--today", "2027-02-28"])
        check(p.returncode == 0, f"--today 2027-02-28 exit {p.returncode}")
        if led:
            check(all(o["late"] is False for o in led["orders"]), "--today 2027-02-28: an order is late (order-by 2027-02-28 is today)")
        p, led = report(big, out, ["--today", "2027-03-01"])
        check(p.returncode == 0, f"--today 2027-03-01 exit {p.returncode}")
        if led:
            late = {(o["month"], o["reagent"]) for o in led["orders"] if o["late"] is True}
            check(late == {("2027-03", "Cl2")}, f"--today 2027-03-01: late orders {sorted(late)} != March Cl2 only")
            check(any("Cl2" in w["message"] and "late" in w["message"].lower() for w in led["warnings"]),
                  f"--today 2027-03-01: no late-order warning: {led['warnings']}")
            check(led.get("today", "2027-03-01").startswith("2027-03-01"), f"ledger today {led.get('today')}")
        p, led = report(big, out, ["--today", "2027-03-01", "--strict"])
        check(p.returncode == 3, f"--today 2027-03-01 --strict exit {p.returncode}, want 3")
        p = run(["report", big, "-o", out, "--today", "2027-13-01"])
        check(p.returncode == 2, f"--today 2027-13-01 exit {p.returncode}, want 2")

        # ---- cautions printed by `check`
        if led_s:
            check_cautions("stress", stress, led_s, ["Cl2", "HCl", "NaOCl"])
        all_camp = {
            "format": "haloledger-campaign/1", "title": "every reagent", "site": "bench", "issued": "2027-01-01",
            "scrubbers": [{"id": "S", "liquor": "naoh", "naoh_wt_pct": 20, "liquor_kg": 50000,
                           "min_naoh_wt_pct": 1, "rated_acid_kmol_h": 100}],
            "runs": [dict(id=f"R{i}", start=f"2027-03-0{i + 1}T06:00", scrubber="S", substrate=sub,
                          substrate_kg=100, reagent=rg, reagent_eq=0.5, halogen_conversion=0.9,
                          temp_c=60, feed_h=2)
                     for i, (rg, sub) in enumerate((("Cl2", {"name": "propane", "smiles": "CCC"}),
                                                    ("Br2", {"name": "propane", "smiles": "CCC"}),
                                                    ("SO2Cl2", {"name": "cyclohexane", "smiles": "C1CCCCC1"}),
                                                    ("NBS", {"name": "toluene", "smiles": "Cc1ccccc1"}),
                                                    ("HBr", {"name": "propene", "smiles": "C=CC"})))]}
        allp = os.path.join(tmp, "all-reagents.json")
        with open(allp, "w") as f:
            json.dump(all_camp, f)
        out = os.path.join(tmp, "all.json")
        p, led = report(allp, out)
        if check(p.returncode == 0 and led, f"all reagents: report exit {p.returncode}: {p.stderr.strip()}"):
            check_cautions("all reagents", allp, led, ["Cl2", "Br2", "HCl", "HBr", "SO2", "SO2Cl2", "NBS", "NaOCl"])
    for f in fails:
        print("FAIL:", f)
    print(f"acceptance_scrubber: {TALLY.n - len(fails)}/{TALLY.n} checks passed in {time.time() - T0:.1f} s")
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
