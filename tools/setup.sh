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
    log="$VENV/install.log"
    if ! { "$VENV/bin/python" -m pip install --disable-pip-version-check --upgrade pip &&
           "$VENV/bin/python" -m pip install --disable-pip-version-check -e ".[test]"; } >"$log" 2>&1; then
        tail -n 40 "$log"
        echo "setup: installing failed; the full log is in $log" >&2
        exit 1
    fi
    echo "$want" > "$stamp"
fi
export SVERDRUP_KIT_DATA="${SVERDRUP_KIT_DATA:-$ROOT/.cache/sverdrup_kit}"
export MPLBACKEND="${MPLBACKEND:-Agg}"
