#!/usr/bin/python3
"""gen_campaign.py N OUT.json [SITES] - an invented site's campaign of N runs for `make bench`.

One run starts every 30 minutes, round robin over 12 reactors (each reactor starts one every
6 h, feeds for 1.25 to 1.5 h, so each scrubber is idle between runs), three reactors to each of 4 scrubbers, nine recipes over eight
substrates and all five reagents. SITES > 1 runs that many copies of the site side by side
(ids prefixed S2-, S3- ...), so 10^6 runs fit the reader's span of years while each site keeps
the same shape. Every run is its own entry with its own batch size (no `repeat`), so every
balance is computed. Deterministic: the same N gives the same bytes.
"""
import sys

# (substrate name, SMILES, reagent, reagent_eq, temp_c, feed_h, reactor_mode)
RECIPES = [
    ('toluene', 'Cc1ccccc1', 'Cl2', 0.45, 95, 1.5, 'batch'),
    ('2-methylpropane', 'CC(C)C', 'Cl2', 0.6, 40, 1.5, 'batch'),
    ('ethylbenzene', 'CCc1ccccc1', 'Br2', 0.95, 80, 1.5, 'batch'),
    ('cyclohexane', 'C1CCCCC1', 'SO2Cl2', 0.8, 60, 1.25, 'cstr'),
    ('toluene', 'Cc1ccccc1', 'NBS', 1.0, 80, 1.5, 'batch'),
    ('cyclohexene', 'C1=CCCCC1', 'NBS', 0.9, 77, 1.5, 'batch'),
    ('1-octene', 'C=CCCCCCC', 'HBr', 0.95, 20, 1.5, 'batch'),
    ('styrene', 'C=Cc1ccccc1', 'HBr', 0.97, 10, 1.25, 'batch'),
    ('propane', 'CCC', 'Cl2', 0.5, 25, 1.5, 'cstr'),
]
REACTORS, SCRUBBERS, SLOT_MIN = 12, 4, 30
T0_MIN = 0  # minutes after 2027-01-01T00:00


def stamp(minutes):
    """ISO 8601 local time of T0 + minutes (proleptic Gregorian, no time zone)."""
    days, rem = divmod(minutes, 1440)
    y, m = 2027, 1
    mdays = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]
    while True:
        leap = y % 4 == 0 and (y % 100 != 0 or y % 400 == 0)
        ylen = 366 if leap else 365
        if days < ylen:
            break
        days -= ylen
        y += 1
    leap = y % 4 == 0 and (y % 100 != 0 or y % 400 == 0)
    while True:
        ml = mdays[m - 1] + (1 if m == 2 and leap else 0)
        if days < ml:
            break
        days -= ml
        m += 1
    return '%04d-%02d-%02dT%02d:%02d' % (y, m, days + 1, rem // 60, rem % 60)


def main():
    n = int(sys.argv[1])
    out = sys.argv[2]
    sites = int(sys.argv[3]) if len(sys.argv) > 3 else 1
    pre = lambda s: '' if s == 0 else 'S%d-' % (s + 1)
    with open(out, 'w') as f:
        f.write('{"format": "haloledger-campaign/1",\n"title": "Bench campaign, %d runs",\n'
                '"site": "Kelderwick works (invented bench site)",\n"issued": "2026-12-01",\n' % n)
        f.write('"scrubbers": [\n')
        f.write(',\n'.join(
            '{"id": "%sVS-%d", "liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 20000, '
            '"min_naoh_wt_pct": 2, "rated_acid_kmol_h": 40, "max_liquor_temp_c": 70}' % (pre(s), u + 1)
            for s in range(sites) for u in range(SCRUBBERS)))
        f.write('],\n"stock": [\n')
        f.write(',\n'.join('{"reagent": "%s", "on_hand_kg": %d, "safety_kg": %d, "lead_days": %d}' % r
                           for r in [('Cl2', 5000, 2000, 10), ('Br2', 2000, 500, 21),
                                     ('SO2Cl2', 1000, 500, 14), ('NBS', 1000, 200, 14),
                                     ('HBr', 1000, 200, 14), ('NaOH', 20000, 5000, 7)]))
        f.write('],\n"runs": [\n')
        for i in range(n):
            s, k = i % sites, i // sites          # site, run number within the site
            name, smi, rg, eq, temp, feed, mode = RECIPES[k % len(RECIPES)]
            reactor = k % REACTORS
            kg = 600 + (k * 7919) % 401           # batch sizes 600..1000 kg
            f.write('%s{"id": "%sB%07d", "start": "%s", "reactor": "%sR-%02d", "scrubber": "%sVS-%d", '
                    '"substrate": {"name": "%s", "smiles": "%s"}, "substrate_kg": %d, '
                    '"reagent": "%s", "reagent_eq": %s, "halogen_conversion": 0.97, "temp_c": %s, '
                    '"feed_h": %s, "reactor_mode": "%s"}'
                    % (',\n' if i else '', pre(s), k + 1, stamp(T0_MIN + k * SLOT_MIN), pre(s),
                       reactor + 1, pre(s), reactor % SCRUBBERS + 1, name, smi, kg, rg, eq, temp,
                       feed, mode))
        f.write('\n]}\n')


if __name__ == '__main__':
    main()
