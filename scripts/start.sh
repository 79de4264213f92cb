#!/usr/bin/env bash
# npm start: bring Bandcross up on this machine (installs what is missing first).
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
# shellcheck source=scripts/stack/deps.sh
. scripts/stack/deps.sh

need_node
need_node_modules
missing=()
have_postgres || missing+=(postgresql)
need_apt_packages "${missing[@]}"

exec node --import tsx scripts/stack.ts start "$@"
