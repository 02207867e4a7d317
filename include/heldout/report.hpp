// heldout/report.hpp — pictures of an evaluation: the SVG writer and the plots.
//
//   #include <heldout/report.hpp>
//   heldout::report::save(heldout::report::roc_plot(curves), "roc.svg");
#pragma once

#include <heldout/report/plots.hpp>
#include <heldout/report/svg.hpp>
