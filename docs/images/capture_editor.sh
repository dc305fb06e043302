#!/bin/sh
# Regenerate docs/images/editor-neovim.png: Neovim's built-in LSP client runs
# `dualize serve` on a bundled example inside tmux; the pane (diagnostics and a
# hover on the constraint `side`) is captured with its colours and drawn as a PNG.
# Needs neovim (0.7 or later), tmux, Pillow and fontTools. Run from the repository root.
set -eu
root=$(pwd)
work=$(mktemp -d)
cp examples/shift_partition.prob docs/images/nvim-demo.lua "$work/"
tmux kill-session -t dualize-demo 2>/dev/null || true
tmux new-session -d -s dualize-demo -x 100 -y 22 \
  "cd '$work' && PYTHONPATH='$root' nvim -u nvim-demo.lua shift_partition.prob"
sleep 8                                   # the server starts and publishes diagnostics
tmux send-keys -t dualize-demo "9G^"
sleep 1
tmux send-keys -t dualize-demo ":lua vim.lsp.buf.hover()" Enter
sleep 8                                   # the hover waits for the derivation
tmux capture-pane -t dualize-demo -e -p > "$work/pane.ansi"
tmux kill-session -t dualize-demo
python docs/images/pane_to_png.py "$work/pane.ansi" docs/images/editor-neovim.png
rm -rf "$work"
