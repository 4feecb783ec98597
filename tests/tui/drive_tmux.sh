#!/usr/bin/env bash
# Drive the real wallscreen interface in a tmux terminal, as a user would, and check
# what it shows: first-start cautions, the corridor, an edit of a height, save, the
# detail view, the keys, quit. Screens are kept in $OUT (text and colour escapes).
#
#   tests/tui/drive_tmux.sh            # uses python3, or $PYTHON
#   OUT=shots tests/tui/drive_tmux.sh  # keep the captured screens
#
# Exit 0 on success, 1 on a failed step (the last screen is printed), and 0 with
# "SKIP" when tmux is not installed, so CI without tmux stays green.
set -u

if ! command -v tmux >/dev/null 2>&1; then
    echo "SKIP: tmux is not installed"
    exit 0
fi

ROOT="$(cd "$(dirname "$0")/../.." && pwd)"
PY="${PYTHON:-python3}"
WORK="$(mktemp -d)"
OUT="${OUT:-$WORK/screens}"
mkdir -p "$OUT"
SOCKET="wallscreen-drive-$$"
T="tmux -L $SOCKET"
step=0

cleanup() { $T kill-server >/dev/null 2>&1; rm -rf "$WORK/config"; }
trap cleanup EXIT

shot() { $T capture-pane -p -t app > "$OUT/$1.txt"; $T capture-pane -p -e -t app > "$OUT/$1.ansi"; }

fail() {
    echo "FAIL at step $step: $1"
    $T capture-pane -p -t app 2>/dev/null
    exit 1
}

# wait until the screen shows a pattern (extended regex), up to 45 s (a loaded CI machine)
wait_for() {
    for _ in $(seq 450); do
        $T capture-pane -p -t app 2>/dev/null | grep -qE -- "$1" && return 0
        sleep 0.1
    done
    fail "waited for '$1'"
}

keys() { $T send-keys -t app "$@"; }
text() { $T send-keys -t app -l "$1"; }
pause() { sleep "${1:-0.3}"; }  # after keys that move focus or change screens

cp "$("$PY" -c 'from screening.model.presets import demo_corridor_path; print(demo_corridor_path())')" \
   "$WORK/corridor.toml" || fail "demo corridor not found"
ID="$("$PY" -c '
import sys
from screening import store
from screening.tui.placing import chainage_order
print(chainage_order(store.load(sys.argv[1]).segments)[3].id)' "$WORK/corridor.toml")"

$T kill-server >/dev/null 2>&1
$T new-session -d -s app -x 160 -y 45 -e TERM=xterm-256color -e COLORTERM=truecolor \
    -e XDG_CONFIG_HOME="$WORK/config" \
    "cd '$ROOT' && '$PY' -m screening '$WORK/corridor.toml'; echo EXIT=\$?; sleep 30" \
    || fail "tmux did not start"

step=1; wait_for "Before you start"; wait_for "licensed engineer"; shot 1-cautions
keys Enter; pause
step=2; wait_for "segments .*factor set"; wait_for "not a design"; shot 2-corridor

step=3  # edit the end height of the fourth row
keys Down Down Down; pause 0.2
keys e; wait_for "Segment $ID"; pause
for _ in 1 2 3 4 5 6; do keys Tab; pause 0.2; done
keys Home; pause 0.2; keys C-k; pause 0.2; text "7.5"
wait_for "$ID: Exposed at to = 7.5 m"
wait_for "unsaved changes"; shot 3-edited
keys Escape; pause

step=4; keys C-s; wait_for "saved .*corridor.toml"; shot 4-saved
"$PY" - "$WORK/corridor.toml" "$ID" <<'EOF' || fail "the saved file does not hold the edit"
import sys
from screening import store
seg = next(s for s in store.load(sys.argv[1]).segments if s.id == sys.argv[2])
assert seg.height_end_m == 7.5, seg.height_end_m
EOF

step=5; keys Enter; pause; wait_for "Why this verdict"; wait_for "levelling pad"; shot 5-detail
keys Escape; pause

step=6; keys '?'; pause; wait_for "Bulk edit"; shot 6-keys
keys Escape; pause

step=7; keys q; wait_for "EXIT=0"
echo "OK: drove wallscreen in tmux; screens in $OUT"
