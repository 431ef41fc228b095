#!/usr/bin/env bash
# Run `python -m tui demo` in a detached tmux at 80x24 and 160x45 and print
# what the terminal shows (capture-pane), so a reviewer can check the layout
# without a terminal of that size.
#
#   bash bench/tmux_check.sh              # both sizes
#   KEYS="tab enter" bash bench/tmux_check.sh   # also send keys, capture again
#   SIZES="120x40" bash bench/tmux_check.sh
#
# Uses its own tmux server socket and a throwaway XDG_DATA_HOME, and stops
# only that server.  Needs tmux.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd)
command -v tmux >/dev/null || { echo "tmux_check: tmux is not installed" >&2; exit 2; }

SOCK="tripwise-check-$$"
DATA=$(mktemp -d)
SIZES=${SIZES:-"80x24 160x45"}
KEYS=${KEYS:-}
PY=${PYTHON:-python}

cleanup() {
    tmux -L "$SOCK" kill-server 2>/dev/null || true
    rm -rf "$DATA"
}
trap cleanup EXIT

# Wait until the pane has shown the same text for half a second (at most ~15 s).
settle() {
    local prev="" cur="" i same=0
    for i in $(seq 1 60); do
        cur=$(tmux -L "$SOCK" capture-pane -p -t check 2>/dev/null || true)
        if [[ -n "${cur//[[:space:]]/}" && "$cur" == "$prev" ]]; then
            same=$((same + 1))
            [[ $same -ge 2 ]] && return 0
        else
            same=0
        fi
        prev=$cur
        sleep 0.25
    done
}

show() {
    local title=$1 w=$2
    printf '\n===== %s =====\n' "$title"
    tmux -L "$SOCK" capture-pane -p -t check
    printf '%*s\n' "$w" '' | tr ' ' '='
}

for size in $SIZES; do
    w=${size%x*}
    h=${size#*x}
    tmux -L "$SOCK" new-session -d -s check -x "$w" -y "$h" \
        "cd '$ROOT' && XDG_DATA_HOME='$DATA' TERM=xterm-256color $PY -m tui demo; echo '[exit status' \$?']'; sleep 600"
    settle
    show "python -m tui demo at ${w}x${h}" "$w"
    if [[ -n "$KEYS" ]]; then
        for k in $KEYS; do
            tmux -L "$SOCK" send-keys -t check "$k"
            settle
        done
        show "after keys: $KEYS (${w}x${h})" "$w"
    fi
    tmux -L "$SOCK" kill-session -t check 2>/dev/null || true
done
