#!/usr/bin/env bash
# Installs the Debian tools the tests use, if they are missing:
#   chromium   the batch report page is loaded in headless Chromium
#   slurm-wlm  the farm round trip runs on a real single-node Slurm (started by the test itself)
#   openexr, openimageio-tools  exrheader, oiiotool and idiff read the OpenEXR files we write,
#              and oiiotool writes the ones our reader must read
#   ffmpeg     review movies are encoded by it and checked with ffprobe
#   blender, python3-numpy  the 3-D scene reference: builds and exports the test scene (glTF), reports
#              where its lights project and renders its depth pass (the exporter needs numpy)
#   python3-opencv  the reference for finding lights in plates (connected components, moments)
#   python3-pyopencolorio  the reference for colour-space conversions (OpenColorIO's built-in ACES transforms)
#   python3-yaml, python3-scipy  the independent ray tracer reads lens files itself (PyYAML); the
#              starburst's Airy pattern comes from scipy's Bessel function j1
set -euo pipefail
need=()
command -v chromium >/dev/null 2>&1 || need+=(chromium)
[ -x /usr/sbin/slurmctld ] || need+=(slurm-wlm)
command -v exrheader >/dev/null 2>&1 || need+=(openexr)
command -v oiiotool >/dev/null 2>&1 || need+=(openimageio-tools)
command -v ffprobe >/dev/null 2>&1 || need+=(ffmpeg)
command -v blender >/dev/null 2>&1 || need+=(blender)
/usr/bin/python3 -c 'import numpy' >/dev/null 2>&1 || need+=(python3-numpy)
/usr/bin/python3 -c 'import cv2' >/dev/null 2>&1 || need+=(python3-opencv)
/usr/bin/python3 -c 'import PyOpenColorIO' >/dev/null 2>&1 || need+=(python3-pyopencolorio)
/usr/bin/python3 -c 'import yaml' >/dev/null 2>&1 || need+=(python3-yaml)
/usr/bin/python3 -c 'import scipy.special' >/dev/null 2>&1 || need+=(python3-scipy)
if [ ${#need[@]} -gt 0 ]; then
  sudo=""
  [ "$(id -u)" -eq 0 ] || sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${need[@]}"
fi
