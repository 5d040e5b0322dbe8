"""Regenerates garden_supplies.csv: invented demo data for the quickstart.

A made-up regional distributor of garden supplies with 32 monthly product
lines in four categories (units sold, January 2019 to December 2025), with
category-specific spring/summer peaks, per-line growth, multiplicative
noise, one low-volume line and a two-month gap in one line (a warehouse
system outage). Nothing here is real data. Run: python3 generate.py
"""
import math
import random

random.seed(20261201)
cats = {
    "seeds": ["tomato", "lettuce", "sunflower", "wildflower", "herb-mix", "bean", "pumpkin", "carrot"],
    "tools": ["trowel", "pruner", "rake", "spade", "hoe", "gloves", "kneeler", "shears"],
    "irrigation": ["hose-15m", "hose-30m", "sprinkler", "drip-kit", "timer", "watering-can", "butt-200l", "nozzle"],
    "furniture": ["bench", "parasol", "lounger", "bistro-set", "planter-l", "planter-s", "trellis", "firepit"],
}
peak = {"seeds": 3, "tools": 4, "irrigation": 6, "furniture": 5}  # month of peak, 0 = January
amp = {"seeds": 0.9, "tools": 0.5, "irrigation": 0.8, "furniture": 0.7}
rows = ["product,month,units"]
n = 84
for c, items in cats.items():
    for k, it in enumerate(items):
        base = random.uniform(40, 400)
        growth = random.uniform(-0.004, 0.012)
        a = amp[c] * random.uniform(0.7, 1.2)
        p = peak[c] + random.choice([-1, 0, 0, 1])
        noise = random.uniform(0.06, 0.15)
        for t in range(n):
            y, m = 2019 + t // 12, t % 12
            season = math.exp(a * math.cos(2 * math.pi * (m - p) / 12))
            level = base * math.exp(growth * t)
            v = level * season * math.exp(random.gauss(0, noise))
            if c == "furniture" and it == "firepit":
                v = max(0.0, round(v / 25 + random.gauss(0, 1.5)))
            s = str(int(round(v)))
            if it == "sprinkler" and (y, m) in [(2023, 5), (2023, 6)]:
                s = ""
            rows.append(f"{c}/{it},{y}-{m+1:02d},{s}")
with open("garden_supplies.csv", "w") as f:
    f.write("\n".join(rows) + "\n")
