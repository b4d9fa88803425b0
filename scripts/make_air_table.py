"""Write solver/data/air_1atm.csv, the outer-film air table, from CoolProp's air model.

Run after a CoolProp upgrade: `.venv/bin/python scripts/make_air_table.py`. tests/test_air_table.py
fails when the shipped file and CoolProp disagree.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from solver.films import AIR_TABLE, AirAtOneAtmosphere  # noqa: E402

if __name__ == "__main__":
    AirAtOneAtmosphere.from_coolprop().write(AIR_TABLE)
    print(f"written: {AIR_TABLE}")
