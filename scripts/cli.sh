#!/bin/sh
# `npm run analyze` and `npm run import`, and the same without npm's own start-up (about 0.3 s):
#   sh scripts/cli.sh analyze|import ARGS...
#
# Runs the command-line tool's compiled bundle (dist/node/worker/cli/<tool>.js). When the build is older than a
# source (or missing), scripts/run-compiled.mjs builds it first and then runs it; the quick test here is `find`'s
# (a few ms, against ~20 ms for starting run-compiled.mjs and its own check). Its list of sources is
# NODE_SOURCES of scripts/lib/node-build-state.mjs with the lock file and the TypeScript configuration
# (tests/unit/scripts/cli-launcher.test.ts checks they agree).
#
# glibc's malloc is asked to back its large blocks with transparent huge pages (GLIBC_TUNABLES
# glibc.malloc.hugetlb=1; glibc 2.35 or later, elsewhere ignored; any GLIBC_TUNABLES of your own are kept). A deep
# record's sample arrays are such blocks, and on this project's 2-core VM the first touch of each of their 4 KiB
# pages cost about 4 µs: the analyze CLI on the 10-million-sample capture had 63 000 page faults, 17 000 with the
# setting, and took 0.975 s against 1.09 s, and in a quieter hour 0.825 s against 0.863 s (medians of 8 and of 12
# alternating runs, 3 December 2026). The kernel allows huge
# pages on request when /sys/kernel/mm/transparent_hugepage/enabled is "madvise" (Debian's default) or "always";
# the results are the same either way.
#
# NODE_EXTRA_CA_CERTS is dropped: Node reads and parses that file of certificates at every start, before any code
# runs (`node -e 0` 126 ms with it, 40 ms without, for a 220 KB bundle of Debian's CAs; medians of 15, 3 December
# 2026), and the two tools open no network connection, only local files.
tool=$1
case "$tool" in
  analyze | import) shift ;;
  *)
    echo "usage: sh scripts/cli.sh analyze|import ARGS..." >&2
    exit 2
    ;;
esac
# The physical path (pwd -P): the tool runs only when it is the main module, compared by its real path.
root=$(cd "$(dirname "$0")/.." && pwd -P)
GLIBC_TUNABLES="${GLIBC_TUNABLES:+$GLIBC_TUNABLES:}glibc.malloc.hugetlb=1"
export GLIBC_TUNABLES
unset NODE_EXTRA_CA_CERTS
stamp="$root/dist/node/.built"
if [ -f "$stamp" ] && [ -f "$root/dist/node/worker/cli/$tool.js" ] && command -v find > /dev/null 2>&1; then
  newer=$(cd "$root" && find server worker shared fixtures/lib scripts package-lock.json tsconfig.json \
    -name node_modules -prune -o -newer "$stamp" -print -quit 2>/dev/null)
  if [ -z "$newer" ]; then
    exec node "$root/dist/node/worker/cli/$tool.js" "$@"
  fi
fi
exec node "$root/scripts/run-compiled.mjs" "worker/cli/$tool.ts" "$@"
