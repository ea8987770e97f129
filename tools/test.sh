#!/usr/bin/env bash
# Runs the whole test suite, notebooks included, after doing all set-up itself.
source "$(dirname "${BASH_SOURCE[0]}")/setup.sh"
"$VENV/bin/python" -m data_recipes.marine_climatology || echo "test: data recipe failed; real-data tests will say so"
"$VENV/bin/python" -m data_recipes.coastlines || echo "test: coastline recipe failed; maps fall back to the data's land mask"
export CARTOPY_DATA_DIR="$SVERDRUP_KIT_DATA/cartopy"
exec "$VENV/bin/python" -m pytest --nbval-lax --nbval-current-env -p no:cacheprovider "$@"
