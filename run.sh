#!/usr/bin/env bash
# Set up on first use, then start Calorun: `./run.sh` opens the bundled demo project,
# `./run.sh FILE.json` opens a project, `./run.sh solve FILE.json` solves headless.
set -euo pipefail
cd "$(dirname "$0")"
scripts/setup.sh
exec .venv/bin/calorun "$@"
