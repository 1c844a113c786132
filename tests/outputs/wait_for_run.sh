# Sourced by the fault-injection tests. wait_for_run FOLDER PID: waits (up to 60 s) until the
# freshet process PID is routing into FOLDER, which it is once its staging folder
# (.<storm>.freshet-<pid>-<hex>.partial) exists; returns 1 if it ends or never gets there.
wait_for_run() {
  _tries=0
  while [ -z "$(find "$1" -name ".*.freshet-$2-*.partial" 2>/dev/null)" ]; do
    kill -0 "$2" 2>/dev/null || return 1
    _tries=$((_tries + 1))
    if [ "$_tries" -gt 600 ]; then kill -KILL "$2"; return 1; fi
    sleep 0.1
  done
  return 0
}
