# Debian packages Emberlith needs; sourced by scripts/check and scripts/demo.
# Installs only what is missing, non-interactively, from Debian's archive.

EMBER_PACKAGES=(
  # toolchain
  build-essential cmake pkg-config
  # core library
  libeigen3-dev libtbb-dev libboost-filesystem-dev libboost-math-dev
  # tests
  libgtest-dev python3-numpy python3-scipy
  # cooling curves in the briefing (pvbatch uses the system python3)
  python3-matplotlib
  # well-kept helpers (YAML, CLI, logging, JSON)
  libyaml-cpp-dev libcli11-dev libfmt-dev libspdlog-dev nlohmann-json3-dev
  # viewer SDK and what find_package(ParaView) needs besides
  paraview paraview-dev python3-paraview
  qtbase5-dev qttools5-dev qttools5-dev-tools libqt5svg5-dev qtxmlpatterns5-dev-tools
  libqt5opengl5-dev
  # what the SDK's VTK config looks for when the plugin's components are found (measured:
  # configure fails without MPI headers and double-conversion; the rest are its other finds)
  libopenmpi-dev libdouble-conversion-dev liblz4-dev liblzma-dev libexpat1-dev libfreetype-dev
  libglew-dev zlib1g-dev libpng-dev libjpeg-dev libtiff-dev libgl-dev libx11-dev libxt-dev
  libgl2ps-dev
  # headless rendering and movies
  xvfb xauth ffmpeg
)

ember_install_packages()
{
  local missing=() p
  for p in "${EMBER_PACKAGES[@]}"; do
    if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
      missing+=("$p")
    fi
  done
  if [ ${#missing[@]} -eq 0 ]; then
    echo "packages: all ${#EMBER_PACKAGES[@]} present"
    return 0
  fi
  if [ "$(id -u)" -ne 0 ]; then
    echo "error: missing Debian packages (run as root to install them): ${missing[*]}" >&2
    return 1
  fi
  echo "packages: installing ${#missing[@]} missing: ${missing[*]}"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends "${missing[@]}"
}
