# Shared set-up for tools/serve.sh and tools/check.sh: install missing system packages (Debian/Ubuntu).
# Sourced, not run.

tidewell_apt_install() {
    # Install the Debian packages named in "$@" ("package:command") whose command is not on the PATH yet
    # (a command already there, from Debian or elsewhere, is left alone: e.g. a Node.js with its own npm).
    local missing=() item pkg cmd
    for item in "$@"; do
        pkg=${item%%:*}
        cmd=${item#*:}
        command -v "$cmd" >/dev/null 2>&1 || missing+=("$pkg")
    done
    ((${#missing[@]})) || return 0
    local sudo=""
    if [ "$(id -u)" != 0 ]; then
        command -v sudo >/dev/null || { echo "need root (or sudo) to install: ${missing[*]}" >&2; return 1; }
        sudo=sudo
    fi
    echo "== installing Debian packages: ${missing[*]}"
    $sudo apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
}

tidewell_python() {
    # The interpreter to use: python3 >= 3.11.
    local py
    py=$(command -v python3 || true)
    [ -n "$py" ] || { echo "python3 is required" >&2; return 1; }
    "$py" -c 'import sys; sys.exit(0 if sys.version_info >= (3, 11) else 1)' \
        || { echo "python3 >= 3.11 is required ($("$py" --version))" >&2; return 1; }
    echo "$py"
}
