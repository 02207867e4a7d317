// heldout/query.hpp — ranking by query: NDCG, DCG, precision and recall at k, reciprocal
// rank and average precision at k, tie-exact; per-query results, intervals over queries and
// paired comparisons of two rankers.
//
//   #include <heldout/query.hpp>
//   auto r = heldout::evaluate_queries(heldout::measure::ndcg{.k = 10}, query, relevance, scores);
//   heldout::estimate e = heldout::estimate_queries(r, 0.95);
//   heldout::comparison c = heldout::compare_queries(r, r_other, {});
//   double v = heldout::evaluate(heldout::measure::recall_at{.k = 5}, heldout::by_query(query, relevance), scores);
#pragma once

#include <heldout/query/accumulator.hpp>
#include <heldout/query/average_precision_at.hpp>
#include <heldout/query/compare_queries.hpp>
#include <heldout/query/estimate_queries.hpp>
#include <heldout/query/evaluate_queries.hpp>
#include <heldout/query/gains.hpp>
#include <heldout/query/judgements.hpp>
#include <heldout/query/ndcg.hpp>
#include <heldout/query/precision_at.hpp>
#include <heldout/query/reciprocal_rank.hpp>
