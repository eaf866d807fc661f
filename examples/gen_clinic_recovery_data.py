"""Generate examples/clinic-recovery-data.csv: invented raw data for the
worked example (the fictional Riverside Physiotherapy Clinic).

58 patients per protocol, two of them in each arm lost to follow-up (NA), so
56 measured per arm as in examples/clinic-recovery.json. Days to recovery are
whole days drawn from a normal shape, scaled so that the arms come close to
the summary figures of the worked example (39.4 and 42.1 days, SD 6.3 and
5.8). Standard library only; the seed makes it reproducible:

    python3 examples/gen_clinic_recovery_data.py > examples/clinic-recovery-data.csv
"""

import random
import statistics


def arm(rng, n, mean, sd):
    raw = [rng.gauss(0.0, 1.0) for _ in range(n)]
    m, s = statistics.fmean(raw), statistics.stdev(raw)
    return [round(mean + sd * (x - m) / s) for x in raw]


def main():
    # The first seed whose rounded arms stay within 0.05 day of the targets.
    for seed in range(1, 10000):
        rng = random.Random(seed)
        new = arm(rng, 56, 39.4, 6.3)
        std = arm(rng, 56, 42.1, 5.8)
        ok = all(
            abs(statistics.fmean(v) - m) < 0.05 and abs(statistics.stdev(v) - s) < 0.05
            for v, m, s in ((new, 39.4, 6.3), (std, 42.1, 5.8))
        )
        if ok:
            break
    rows = []
    lost = {17, 44}  # positions in each arm lost to follow-up
    for arm_name, values in (("early loading", new), ("standard", std)):
        vals = list(values)
        for pos in sorted(lost):
            vals.insert(pos, None)
        for v in vals:
            rows.append((arm_name, v))
    # Interleave the arms in enrolment order.
    ages = [rng.randint(24, 71) for _ in rows]
    order = list(range(len(rows)))
    rng.shuffle(order)
    print("patient,protocol,age_years,recovery_days,recovered_by_day_42")
    for i, k in enumerate(order):
        protocol, days = rows[k]
        if days is None:
            print(f"RPC-{i + 1:03d},{protocol},{ages[i]},NA,NA")
        else:
            print(f"RPC-{i + 1:03d},{protocol},{ages[i]},{days},{'yes' if days <= 42 else 'no'}")


if __name__ == "__main__":
    main()
