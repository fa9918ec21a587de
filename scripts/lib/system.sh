# Shared by the start, test and CI scripts: install what a fresh Debian machine lacks.

as_root() {
  if [ "$(id -u)" = "0" ]; then "$@";
  elif command -v sudo >/dev/null 2>&1; then sudo "$@";
  else return 1; fi
}

apt_install() {
  # $@: Debian package names
  echo "Installing $* from Debian's packages (apt-get)..."
  if ! as_root env DEBIAN_FRONTEND=noninteractive apt-get update -qq ||
     ! as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" >/dev/null; then
    echo "Could not install $* with apt-get. Install it yourself (as root: apt-get install $*) and run this again." >&2
    exit 1
  fi
}

ensure_mariadb() {
  if ! command -v mariadbd >/dev/null 2>&1 && [ ! -x /usr/sbin/mariadbd ]; then
    apt_install mariadb-server
  fi
  # Debian's package may start its own system server on 3306; Ferrolane never uses it.
}

# What the browser tests need besides Chromium itself: fonts, so text is laid out (and axe measures
# it) the same on every machine. The app ships Open Sans; these are the fallbacks Chromium reaches
# for (DejaVu, and Liberation, metric-compatible with Arial, Times and Courier).
BROWSER_FONT_PACKAGES=(fonts-dejavu-core fonts-liberation)

ensure_chromium() {
  local missing=()
  [ -x /usr/bin/chromium ] || missing+=(chromium)
  # Each font package on its own: a machine may have Chromium but not the fonts, or some of them.
  local pkg
  for pkg in "${BROWSER_FONT_PACKAGES[@]}"; do
    dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q 'install ok installed' || missing+=("$pkg")
  done
  if [ "${#missing[@]}" -gt 0 ]; then apt_install "${missing[@]}"; fi
}

ensure_node_modules() {
  # Reinstall only when the lockfile's content changed since the last install: its timestamp moves
  # on every checkout, and npm ci empties node_modules first.
  local want have
  want=$(sha256sum package-lock.json | cut -d' ' -f1)
  have=$(cat node_modules/.ferrolane-lock-sha256 2>/dev/null || true)
  if [ ! -d node_modules ] || [ "$want" != "$have" ]; then
    echo "Installing npm packages (npm ci)..."
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" > node_modules/.ferrolane-lock-sha256
  fi
}

# The cluster scripts only (npm run cluster, npm run test:cluster): npm start and npm test never
# need these. galera-4 is the replication library; rsync carries a full state transfer to a
# node that rejoins; haproxy routes the database and the app.
ensure_galera() {
  ensure_mariadb
  local missing=()
  [ -e /usr/lib/galera/libgalera_smm.so ] || [ -e /usr/lib/libgalera_smm.so ] || missing+=(galera-4)
  command -v rsync >/dev/null 2>&1 || missing+=(rsync)
  if [ "${#missing[@]}" -gt 0 ]; then apt_install "${missing[@]}"; fi
}

ensure_haproxy() {
  if ! command -v haproxy >/dev/null 2>&1 && [ ! -x /usr/sbin/haproxy ]; then
    apt_install haproxy
  fi
  # Debian's package may start its own haproxy service; Ferrolane's cluster scripts run their own.
}
