// heldout/report.hpp — an evaluation for people: the SVG writer, the plots, numbers at the
// digits their intervals support, and one self-contained HTML page.
//
//   #include <heldout/report.hpp>
//   heldout::report::save(heldout::report::roc_plot(curves), "roc.svg");
//   heldout::report::html_report page({.title = "Two models"});
//   page.estimates(estimates).comparisons(comparisons);
//   page.save("report.html");
#pragma once

#include <heldout/report/html.hpp>
#include <heldout/report/numbers.hpp>
#include <heldout/report/plots.hpp>
#include <heldout/report/svg.hpp>
