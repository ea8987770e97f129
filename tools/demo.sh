#!/usr/bin/env bash
# Runs the whole diagnosis on the bundled synthetic world, after doing all set-up itself.
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh"
"$VENV/bin/python" -m data_recipes.coastlines >/dev/null 2>&1 || true
export CARTOPY_DATA_DIR="$SVERDRUP_KIT_DATA/cartopy"
exec "$VENV/bin/sverdrup-kit" diagnose --synthetic --out sverdrup_output "$@"
