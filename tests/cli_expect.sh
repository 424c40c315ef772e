# Shared by the end-to-end bad-input checks (sourced; needs $edgelaw and $failures set).
# expect CODE DESCRIPTION ARGS...: runs edgelaw, checks code, one stderr line, no out.* file.
expect() {
  local code=$1 what=$2
  shift 2
  "$edgelaw" "$@" > stdout.txt 2> stderr.txt
  local got=$?
  local lines
  lines=$(wc -l < stderr.txt)
  local leftovers
  leftovers=$(ls -A | grep -E '^(\.)?out' | tr '\n' ' ')
  if [[ $got -ne $code || $lines -ne 1 || -n $leftovers ]]; then
    echo "FAIL $what: exit $got (want $code), $lines stderr lines (want 1), leftovers '$leftovers'"
    sed 's/^/  stderr: /' stderr.txt
    failures=$((failures + 1))
  else
    echo "ok   $what: exit $got: $(cat stderr.txt)"
  fi
}
