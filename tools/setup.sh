# Shared set-up for tools/demo.sh and tools/test.sh: sourced, not run.
# Creates ./.venv with Python 3, installs the package with its test extras when pyproject.toml
# changed since the last install, and fetches the offline data the tests and maps use.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
PYTHON="${PYTHON:-python3}"
VENV="$ROOT/.venv"
if [ ! -x "$VENV/bin/python" ]; then
    echo "setup: creating virtual environment in .venv"
    "$PYTHON" -m venv "$VENV"
fi
stamp="$VENV/.sverdrup_kit_installed"
want="$(sha256sum pyproject.toml | cut -d' ' -f1)"
if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
    echo "setup: installing sverdrup-kit and its test dependencies (first run takes about a minute)"
    "$VENV/bin/python" -m pip install --quiet --disable-pip-version-check --upgrade pip
    "$VENV/bin/python" -m pip install --quiet --disable-pip-version-check -e ".[test]"
    echo "$want" > "$stamp"
fi
export SVERDRUP_KIT_DATA="${SVERDRUP_KIT_DATA:-$ROOT/.cache/sverdrup_kit}"
export MPLBACKEND="${MPLBACKEND:-Agg}"
