#!/usr/bin/env bash
# The packed tarball installs and runs with no development tools: build dist/ here (where the dev
# dependencies are) and `npm pack` it, then in an empty folder `npm install --omit=dev
# <tarball>` (better-sqlite3 compiles: about 2 minutes on a quiet machine, 11 under heavy load), `efflux fit` on a demo log, and
# `efflux serve` on a new data folder answering /api/health. Needs the npm registry.
set -euo pipefail
cd "$(dirname "$0")/.."
work=$(mktemp -d "${TMPDIR:-/tmp}/efflux-pack.XXXXXX")
server_pid=
cleanup() {
  if [ -n "$server_pid" ]; then kill "$server_pid" 2>/dev/null || true; fi
  rm -rf "$work"
}
trap cleanup EXIT
fail() { echo "pack: $*"; exit 1; }

# npm pack runs prepare (the build of dist/)
npm pack --pack-destination "$work" > "$work/pack.log" 2>&1 || { cat "$work/pack.log"; fail 'npm pack failed'; }
tarball="efflux-$(node -p 'require("./package.json").version').tgz"
overrides=$(node -p 'JSON.stringify(require("./package.json").overrides ?? {})')
echo "pack: $tarball ($(du -k "$work/$tarball" | cut -f1) KiB)"
tar -tzf "$work/$tarball" > "$work/contents.txt"
for must in package/bin/efflux.js package/dist/server/cli/main.js package/dist/server/core/engine-build.generated.js \
  package/dist/web/index.html package/dist/web/app.js package/migrations/001_initial.sql package/sample-data/manifest.json \
  package/LICENSE package/CHANGELOG.md; do
  grep -qx "$must" "$work/contents.txt" || fail "the tarball lacks $must"
done
if grep -q '^package/\(test\|server\|web/src\|node_modules\)/' "$work/contents.txt"; then fail 'the tarball carries sources or tests it should not'; fi

mkdir "$work/app"
cd "$work/app"
# the installing project as the README shows it: approves better-sqlite3's native build and
# repeats efflux's overrides (npm applies only the root project's overrides)
printf '{ "name": "efflux-pack-check", "private": true, "allowScripts": { "better-sqlite3": true }, "overrides": %s }\n' "$overrides" > package.json
npm install --omit=dev --no-audit --no-fund "$work/$tarball" > "$work/install.log" 2>&1 || { cat "$work/install.log"; fail 'npm install --omit=dev of the tarball failed'; }
if grep -q EBADENGINE "$work/install.log"; then grep -A3 EBADENGINE "$work/install.log"; fail "a dependency refuses this Node ($(node -v))"; fi
[ ! -e node_modules/tsx ] && [ ! -e node_modules/typescript ] || fail 'development dependencies were installed'

npx efflux --version
demo=node_modules/efflux/sample-data
npx efflux fit "$demo/fb1-2026-03-10-preamble.csv" --vessel "$demo/backwash-tank-fb1.vessel.json" --json > fit.json \
  || fail 'efflux fit on the demo log failed'
node -e '
  const f = JSON.parse(require("fs").readFileSync("fit.json", "utf8"));
  const cd = f.dischargeCoefficient?.value ?? f.results?.dischargeCoefficient?.value;
  if (!(cd > 0.5 && cd < 0.7)) { console.log("pack: no plausible Cd in the fit JSON"); process.exit(1); }
  console.log(`pack: efflux fit ok, Cd ${cd.toFixed(4)}, engine ${f.engineVersion}`);
'

# serve on a new data folder (no demo: a new folder starts empty) and ask /api/health
PORT=0 HOST=127.0.0.1 EFFLUX_WORKERS=1 \
  node node_modules/efflux/bin/efflux.js serve --data "$work/data" > "$work/serve.log" 2>&1 &
server_pid=$!
base=
for _ in $(seq 1 120); do
  base=$(grep -o 'listening on http://127\.0\.0\.1:[0-9]*' "$work/serve.log" | head -1 | cut -d' ' -f3) || true
  [ -n "$base" ] && break
  kill -0 "$server_pid" 2>/dev/null || { cat "$work/serve.log"; fail 'efflux serve exited before listening'; }
  sleep 0.5
done
[ -n "$base" ] || { cat "$work/serve.log"; fail 'efflux serve did not listen within 60 s'; }
health=$(node -e 'fetch(process.argv[1] + "/api/health").then(async (r) => { console.log(r.status, await r.text()); process.exit(r.ok ? 0 : 1); }, (e) => { console.log(String(e)); process.exit(1); })' "$base") \
  || fail "GET /api/health: $health"
echo "pack: efflux serve ok, /api/health: $health"
# the first start wrote an admin token into the data folder (never into the output)
token=$(tr -d ' \n' < "$work/data/first-admin-token.txt") || fail 'no first-admin-token.txt in the new data folder'
vessels=$(node -e '
  fetch(process.argv[1] + "/api/vessels", { headers: { authorization: "Bearer " + process.argv[2] } })
    .then(async (r) => { const b = await r.json(); console.log(r.status, "total", b.total); process.exit(r.status === 200 && b.total === 0 ? 0 : 1); }, (e) => { console.log(String(e)); process.exit(1); })' "$base" "$token") \
  || fail "a new data folder must start empty: GET /api/vessels: $vessels"
echo "pack: the new data folder starts empty: $vessels"
# sign in with it from the workbench's own origin (the session cookie goes through cookie)
session=$(node -e '
  fetch(process.argv[1] + "/api/session", { method: "POST", headers: { "content-type": "application/json", origin: process.argv[1] }, body: JSON.stringify({ token: process.argv[2] }) })
    .then((r) => { const c = r.headers.get("set-cookie") ?? ""; console.log(r.status, c.split(";")[0].replace(/=.*/, "=…")); process.exit(r.status === 201 && c ? 0 : 1); }, (e) => { console.log(String(e)); process.exit(1); })' "$base" "$token") \
  || fail "POST /api/session: $session"
echo "pack: sign-in ok: $session"
kill "$server_pid"
wait "$server_pid" 2>/dev/null || true
server_pid=
echo 'pack: ok'
