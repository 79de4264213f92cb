# Shared by scripts/start.sh and scripts/test.sh: make sure the machine has what the stack needs.
# Sourced, not run. Uses: need_node, need_node_modules, need_apt_packages <pkg...>

bx_say() { printf 'bandcross: %s\n' "$*"; }

need_node() {
  if ! command -v node >/dev/null 2>&1; then
    bx_say "Node.js 20 (or newer) is required: https://nodejs.org/ or 'apt-get install -y nodejs npm'" >&2
    exit 1
  fi
  # 20.12 brought process.loadEnvFile (the token command reads the local stack's env file with it).
  if ! node -e 'const [a, b] = process.versions.node.split(".").map(Number); process.exit(a > 20 || (a === 20 && b >= 12) ? 0 : 1)'; then
    bx_say "Node.js $(node -v) is too old; Bandcross needs Node.js 20.12 or newer" >&2
    exit 1
  fi
}

# npm ci when node_modules is missing or older than package-lock.json.
# npm writes node_modules/.package-lock.json at the end of every install, so its age is the install's age.
need_node_modules() {
  local marker=node_modules/.package-lock.json
  if [ ! -d node_modules ] || [ ! -f "$marker" ] || [ package-lock.json -nt "$marker" ]; then
    bx_say "installing dependencies (npm ci)…"
    npm ci --no-audit --no-fund
  fi
}

have_postgres() { compgen -G '/usr/lib/postgresql/*/bin/initdb' >/dev/null; }
have_chromium() { [ -x "${CHROMIUM_PATH:-/usr/bin/chromium}" ]; }

# need_apt_packages postgresql chromium — installs the given Debian packages when root,
# otherwise prints the exact command and exits 1.
need_apt_packages() {
  [ "$#" -eq 0 ] && return 0
  if [ "$(id -u)" -eq 0 ]; then
    bx_say "installing $* from Debian's packages (apt-get)…"
    apt-get update
    DEBIAN_FRONTEND=noninteractive apt-get install -y "$@"
  else
    bx_say "missing system packages: $*" >&2
    bx_say "run this once, then retry:" >&2
    printf '\n    sudo apt-get update && sudo apt-get install -y %s\n\n' "$*" >&2
    printf '(or, as root: apt-get update && apt-get install -y %s)\n' "$*" >&2
    exit 1
  fi
}
