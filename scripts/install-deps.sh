#!/bin/sh
# Installs the Debian packages crustforge builds, tests and plots with.
# As root on Debian or Ubuntu it runs apt-get; otherwise it prints the command to run.
set -e
PACKAGES="build-essential cmake pkg-config petsc-dev libhdf5-openmpi-dev check libyaml-dev
libplplot-dev plplot-driver-cairo hdf5-tools python3-h5py python3-meshio python3-numpy
clang libclang-rt-14-dev valgrind"

missing=""
for p in $PACKAGES; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
[ -z "$missing" ] && exit 0

if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends $missing
else
  echo "crustforge needs these packages; install them with:" >&2
  echo "  sudo apt-get install --no-install-recommends$missing" >&2
  exit 1
fi
