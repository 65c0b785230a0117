# SPDX-License-Identifier: GPL-3.0-or-later
# Shared by the browser checks (browser_check.sh, run_report_check.sh): failure, chromium
# headless in a throw-away profile, and the console messages it logged. Needs $work set.

fail() {
  echo "browser check: FAIL: $*" >&2
  exit 1
}

browser=$(command -v chromium || true)
[ -n "$browser" ] || fail "chromium is not installed (tools/deps.sh installs Debian's chromium)"

rm -rf "$work"
mkdir -p "$work/home"
# Chromium writes caches and settings under HOME; keep them in the scratch folder.
export HOME="$work/home" XDG_CONFIG_HOME="$work/home/.config" XDG_CACHE_HOME="$work/home/.cache"

# --- Chromium, headless: no sandbox (root in a container), no GPU, a throw-away profile. ------
run_browser() {
  local name=$1
  shift
  local rc=0
  timeout -k 10 120 "$browser" --headless --no-sandbox --disable-gpu --disable-dev-shm-usage \
    --no-first-run --no-default-browser-check --disable-extensions --hide-scrollbars \
    --user-data-dir="$work/profile-$name" --enable-logging=stderr --log-level=0 "$@" \
    2>"$work/$name.log" || rc=$?
  if [ "$rc" -ne 0 ]; then
    tail -n 20 "$work/$name.log" >&2
    [ "$rc" -eq 124 ] && fail "chromium ($name) did not finish within 120 s"
    fail "chromium ($name) exited with status $rc"
  fi
}

# Console messages (JavaScript errors, rejected SVG attributes, blocked loads) appear in the log
# as "...:INFO:CONSOLE:12] "message", source: file:///... (12)" (older versions: CONSOLE(12)).
console_messages() {
  grep -E ':CONSOLE[(:][0-9]+' "$1" || true
}


# The report file itself: no scripts, nothing loaded from outside.
check_self_contained() {
  local report=$1
  ! grep -qi '<script' "$report" || fail "the report contains a <script> element"
  external=$(grep -oE '(https?|ftp)://[^"'\'' <>)]*' "$report" | grep -v '^http://www\.w3\.org/' || true)
  [ -z "$external" ] || fail "the report refers to outside resources: $external"
  ! grep -qiE '<(link|img|iframe|object|embed|video|audio)[ >/]|@import|url\([^#)]' "$report" ||
    fail "the report loads a resource (link, img, @import or url() other than #id)"
}
