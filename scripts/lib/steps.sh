# Sourced by scripts/test.sh and scripts/test-integration.sh: run one named step, timed, and stop at its failure.

# now: seconds since the epoch with a fraction, for durations.
now() { date +%s.%N; }
# elapsed START: seconds since START, one decimal.
elapsed() { awk -v a="$1" -v b="$(now)" 'BEGIN { printf "%.1f", b - a }'; }

# step NAME CMD...: prints a header, runs CMD, prints its duration; exits with CMD's code when it fails.
step() {
  local name=$1 started code
  shift
  started=$(now)
  printf '\n\033[1m== %s: %s\033[0m\n' "$name" "$*"
  "$@"
  code=$?
  if [ "$code" -ne 0 ]; then
    printf '\033[1;31m== %s FAILED (exit %s) after %s s\033[0m\n' "$name" "$code" "$(elapsed "$started")"
    exit "$code"
  fi
  printf '== %s passed in %s s\n' "$name" "$(elapsed "$started")"
}

# vitest_json NAME: reporter flags that keep the usual console output and also write a JSON report for the summary.
vitest_json() {
  printf -- '--reporter=default --reporter=json --outputFile.json=%s/%s.json' "${GATEPOST_TEST_REPORTS:?}" "$1"
}
