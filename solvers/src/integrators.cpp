#include "ember/integrators.h"

#include "ember/rkl2.h"

#include <algorithm>
#include <cctype>
#include <stdexcept>

namespace ember
{

std::unique_ptr<Integrator> make_integrator(IntegratorKind kind)
{
  switch (kind)
  {
    case IntegratorKind::ForwardEuler:
      return std::make_unique<ForwardEuler>();
    case IntegratorKind::RKL2:
      break;
  }
  return std::make_unique<Rkl2>();
}

std::string integrator_name(IntegratorKind kind)
{
  return kind == IntegratorKind::ForwardEuler ? "forward-euler" : "rkl2";
}

IntegratorKind integrator_kind(std::string_view name)
{
  std::string key(name);
  std::transform(key.begin(),
                 key.end(),
                 key.begin(),
                 [](unsigned char ch) { return static_cast<char>(std::tolower(ch)); });
  if (key == "rkl2")
    return IntegratorKind::RKL2;
  if (key == "forward-euler" || key == "euler" || key == "fe")
    return IntegratorKind::ForwardEuler;
  throw std::invalid_argument("unknown time integrator \"" + std::string(name) +
                              "\" (use \"rkl2\", the default, or \"forward-euler\")");
}

} // namespace ember
