"""Write solver/data/water_saturation.csv, the saturated-water table of solver.steam, from CoolProp.

Run after a CoolProp upgrade: `.venv/bin/python scripts/make_water_table.py`. tests/test_steam.py
fails when the shipped file and CoolProp disagree.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from solver.steam import WATER_TABLE, _SaturatedWater  # noqa: E402

if __name__ == "__main__":
    _SaturatedWater.from_coolprop().write(WATER_TABLE)
    print(f"written: {WATER_TABLE}")
