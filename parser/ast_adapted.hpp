// Boost.Fusion adaptation of the AST structs, for the grammar only.
#pragma once

#include <boost/fusion/include/adapt_struct.hpp>

#include "parser/ast.hpp"

BOOST_FUSION_ADAPT_STRUCT(settle::ast::range, a, b, c)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::unary, nots, operand)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::arg, label, value)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::call, kind, args)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::arc, from, delay)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::gate_stmt, out, more_outs, value, delay, tau, window, arcs,
                          transport)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::decl, keyword, names)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::default_stmt, delay, transport)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::port_group, dir, names)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::block_head, id, groups)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::binding, port, targets)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::inst_stmt, id, block, binds)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::assign, net, value)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::init_stmt, keyword, assigns)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::timed_stmt, keyword, time, assigns)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::clock_stmt, net, period, high, cycles, at)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::cond_atom, net, eq)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::cond_unary, nots, operand)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::when_stmt, cond, delay, assigns, times)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::edge_part, net, edge)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::property_stmt, keyword, edge, expr)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::gauge_period, word, net)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::gauge_pulse, net, level)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::gauge_latency, from, from_edge, to, to_edge)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::gauge_stmt, id, body)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_gauge, gauge, within)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_resolves, word, net, time)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::settle_stmt, keyword, within)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::run_stmt, keyword, time)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_within, word, time)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_glitch, word, nets)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_word, word, period)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::expect_stmt, keyword, body)
BOOST_FUSION_ADAPT_STRUCT(settle::ast::import_stmt, keyword, path)
