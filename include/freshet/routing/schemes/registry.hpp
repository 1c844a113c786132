// Every routing scheme, registered once. The reach holds one AnyScheme and visits it once
// per advance() (next to its flux law, a template parameter), so no code outside the scheme
// files branches on the scheme kind. Names, front widths and construction come from here.
//
// A new scheme: write its file (the contract is in scheme.hpp; its kKind and its study-file
// name kName), include it below, add its type to AnyScheme, and its enumerator to SchemeKind
// (routing_options.hpp); the checks at the end of this file fail to compile if the two lists
// disagree. Names, parsing and the study file's choices (scheme_names()) follow from here.
#pragma once

#include <cstddef>
#include <string_view>
#include <type_traits>
#include <utility>
#include <variant>

#include "freshet/routing/routing_options.hpp"
#include "freshet/routing/schemes/characteristics.hpp"
#include "freshet/routing/schemes/explicit_upwind.hpp"
#include "freshet/routing/schemes/implicit_upwind.hpp"
#include "freshet/routing/schemes/method_of_lines.hpp"
#include "freshet/routing/schemes/muscl_heun.hpp"
#include "freshet/routing/schemes/muskingum_cunge.hpp"

namespace freshet::routing::schemes {

// In the order of SchemeKind.
using AnyScheme = std::variant<ExplicitUpwind, ImplicitUpwind, MethodOfLines, MusclHeun,
                               Characteristics, MuskingumCunge>;

inline constexpr std::size_t kSchemeCount = std::variant_size_v<AnyScheme>;

// Calls fn(std::type_identity<S>{}) for each registered scheme type S in order, until fn
// returns true.
template <class Fn>
constexpr void for_each_scheme(Fn&& fn) {
  [&]<std::size_t... I>(std::index_sequence<I...>) {
    (fn(std::type_identity<std::variant_alternative_t<I, AnyScheme>>{}) || ...);
  }(std::make_index_sequence<kSchemeCount>{});
}

// The scheme registered for `kind`, constructed for `cells` cells.
[[nodiscard]] inline AnyScheme make_scheme(SchemeKind kind, const RoutingOptions& options,
                                           std::size_t cells) {
  AnyScheme out;
  for_each_scheme([&](auto type) {
    using S = typename decltype(type)::type;
    if (S::kKind != kind) return false;
    out.emplace<S>(options, cells);
    return true;
  });
  return out;
}

// Every registered type meets the contract and sits at the index of its enumerator.
static_assert([]<std::size_t... I>(std::index_sequence<I...>) {
  return ((Scheme<std::variant_alternative_t<I, AnyScheme>> &&
           static_cast<std::size_t>(std::variant_alternative_t<I, AnyScheme>::kKind) == I) && ...);
}(std::make_index_sequence<kSchemeCount>{}));

}  // namespace freshet::routing::schemes
