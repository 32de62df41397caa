#!/usr/bin/env bash
# Drive the real terminal app in tmux for a by-hand check: start it on the invented demo at 80x24,
# walk through an edit, a broken unit, the plots, help and the unsaved-edits question, and print each
# screen.  Read the screens as a user would: are labels clear, are numbers traceable to inputs and units?
#
#   tests/tui/drive_tmux.sh [PYTHON]        (default: python3; needs tmux)
set -euo pipefail
PY=${1:-python3}
S=interact-check-$$
W=${WIDTH:-80}
H=${HEIGHT:-24}
WAIT=${WAIT:-1.5}
T="tmux -L $S"  # a private tmux server: nothing else is touched
shot() { sleep "$WAIT"; echo "===== $1"; $T capture-pane -p -t "$S"; }
keys() { $T send-keys -t "$S" "$@"; sleep 0.3; }
trap '$T kill-server 2>/dev/null || true' EXIT
$T new-session -d -s "$S" -x "$W" -y "$H" "$PY -m interact; sleep 30"
sleep 4
shot "start: the invented demo"
keys Down Down Down Down   # to Cmax (Name, Dose, Route, Interval, Cmax)
shot "Cmax selected: the detail line under the form explains it"
keys End
keys C-u
keys "812 ng/mk"
shot "a broken unit: error under the field, answer marked NOT UPDATED"
keys BSpace l
shot "fixed: 812 ng/mL understood in uM, answer updated"
keys F3; sleep 0.5; keys F5; sleep 0.5; keys Down
keys End
keys C-u
keys "0.9 uM"
shot "pinned, then Ki of the first target changed: differences from the pinned result"
keys F4
shot "plots"
keys F4
keys "$(dirname "$0")/../data/nlstools_vmkmki.csv"
keys Tab
keys uM
keys Enter
shot "fitting view: nlstools vmkmki incubations fitted in a worker, verdict and comparison"
keys Tab
keys Tab
keys Tab
keys Enter
shot "fitted Ki written into the first target (an unsaved edit)"
keys F1
shot "help: keys and equations"
keys Escape C-q
shot "quit with unsaved edits asks first"
keys d
sleep 1
echo "===== done"
