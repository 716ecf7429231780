#!/bin/sh
# Install the system packages the tests need when they are missing (Debian; needs root or sudo).
# Nothing is downloaded except Debian packages.
set -eu
need=""
command -v git >/dev/null 2>&1 || need="$need git"
# the study queue tests start their own redis-server (and read the queue with redis-cli)
command -v redis-server >/dev/null 2>&1 && command -v redis-cli >/dev/null 2>&1 || need="$need redis-server"
# Graphviz's dot reads back the DOT export; Debian's chromium runs the report's browser test
command -v dot >/dev/null 2>&1 || need="$need graphviz"
[ -x /usr/bin/chromium ] || need="$need chromium"
if [ -n "$need" ]; then
  if [ "$(id -u)" = "0" ]; then SUDO=""; else SUDO="sudo"; fi
  echo "installing system packages:$need"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq $need >/dev/null
fi
