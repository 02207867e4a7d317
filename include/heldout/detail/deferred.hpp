// heldout/detail/deferred.hpp — names a type through a template parameter, so that the body of
// a template using it is compiled only when the template is instantiated.
//
//   template <class Derived> void f(const Eigen::MatrixBase<Derived>& m) {
//       detail::deferred_t<Eigen::FullPivLU<Eigen::MatrixXd>, Derived> lu(m);   // not built until f<X> is
//   }
//
// A non-dependent class type in a template (Eigen::FullPivLU<Eigen::MatrixXd> lu) is
// instantiated where the template is defined, in every translation unit that includes the
// header; deferred_t<T, D> is T itself, but dependent on D (bench/include_cost.sh measures it).
#pragma once

#include <heldout/core/config.hpp>

HELDOUT_NAMESPACE_BEGIN

namespace detail {

template <class T, class>
struct deferred {
    using type = T;
};

/// T, named so that it depends on the template parameter D.
template <class T, class D>
using deferred_t = typename deferred<T, D>::type;

} // namespace detail

HELDOUT_NAMESPACE_END
