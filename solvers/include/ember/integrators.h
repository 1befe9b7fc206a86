/**
 * @file integrators.h
 * @brief Pick a time integrator by kind or by name; RKL2 is the default.
 *
 * RKL2 super-time-stepping reaches a given time with far fewer operator applications than
 * forward Euler on fine meshes (bench/README.md) and is second order in time; forward Euler
 * stays selectable as the simplest reference.
 */
#pragma once

#include "ember/simulation.h"

#include <memory>
#include <string>
#include <string_view>

namespace ember
{

enum class IntegratorKind
{
  RKL2,        ///< Runge–Kutta–Legendre super-time-stepping (Rkl2), second order
  ForwardEuler ///< forward Euler at the stable step (ForwardEuler), first order
};

/// A new integrator of the given kind, with its default settings.
std::unique_ptr<Integrator> make_integrator(IntegratorKind kind = IntegratorKind::RKL2);

/// "rkl2" or "forward-euler".
std::string integrator_name(IntegratorKind kind);

/// Kind from its name (case-insensitive; "rkl2", "forward-euler", "euler", "fe"); throws
/// std::invalid_argument naming the unknown name and the accepted ones.
IntegratorKind integrator_kind(std::string_view name);

} // namespace ember
