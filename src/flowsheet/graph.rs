//! The flowsheet as a directed graph (petgraph): feeds and units are nodes, streams are edges,
//! and every product stream ends in a product node of its own. Checks that each stream is made
//! by exactly one feed or unit and used by at most one unit, and finds the solve order.
//!
//! The solve order is a topological order (Kahn 1962, "Topological sorting of large networks",
//! Communications of the ACM 5(11)) that keeps the file order wherever the connections allow it.
//! Cycles (recycles) are torn ([`super::tears`]): the solve order is the topological order of
//! the graph without its tear streams, and the recycle iteration converges the tears.

use std::collections::HashMap;

use petgraph::graph::{DiGraph, NodeIndex};
use petgraph::Direction;

use super::tears::Tearing;
use crate::error::Error;

/// A node of the flowsheet graph.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Node {
    /// A feed, by its index in the feed list.
    Feed(usize),
    /// A unit, by its index in the unit list.
    Unit(usize),
    /// The end of a product stream.
    Product,
}

/// What the graph needs to know of a unit.
pub struct UnitPorts<'a> {
    /// Unit name.
    pub name: &'a str,
    /// Inlet stream names.
    pub inlets: &'a [String],
    /// Outlet stream names.
    pub outlets: &'a [String],
    /// Names of the units it heats (`heats:`; a furnace firing a reformer).
    pub heats: &'a [String],
}

/// The checked graph and the solve order.
#[derive(Debug, Clone)]
pub struct FlowGraph {
    /// Nodes are feeds, units and product ends; edges carry stream names.
    pub graph: DiGraph<Node, String>,
    /// Unit indices in solve order.
    pub order: Vec<usize>,
    /// Product stream names, in the order they are made (feeds first, then solve order).
    pub products: Vec<String>,
    /// For each unit (file order), the units it heats (file order indices); each heated unit
    /// has an edge to its heater, so that it is solved first.
    pub heats: Vec<Vec<usize>>,
    /// Tear streams and the units on cycles ([`super::tears`]); empty without a cycle.
    pub tearing: Tearing,
}

/// Where in the file a graph error points: a unit's key (`name`, `from`, `to`) and the
/// position in that key's list.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct At {
    /// Unit index (file order).
    pub unit: usize,
    /// The key.
    pub key: &'static str,
    /// Position in the key's list (0 for a single name).
    pub index: usize,
}

/// A graph error and, where there is one, the place in the file it points to.
#[derive(Debug)]
pub struct GraphError {
    /// The error (an [`Error::Flowsheet`]), boxed to keep results small.
    pub error: Box<Error>,
    /// Where it points.
    pub at: Option<At>,
}

impl From<GraphError> for Error {
    fn from(e: GraphError) -> Error {
        *e.error
    }
}

/// Who makes a stream.
#[derive(Clone, Copy)]
enum Maker {
    Feed(usize),
    Unit(usize),
}

/// Build and check the graph of `feeds` (names) and `units`, tearing its cycles where it has
/// any ([`super::tears`]).
pub fn build(feeds: &[&str], units: &[UnitPorts<'_>]) -> Result<FlowGraph, GraphError> {
    build_with(feeds, units, &[])
}

/// [`build`], with the tear streams named by the user (`solver: tear-streams`; empty: chosen).
pub fn build_with(
    feeds: &[&str],
    units: &[UnitPorts<'_>],
    named_tears: &[String],
) -> Result<FlowGraph, GraphError> {
    let mut unit_names: HashMap<&str, usize> = HashMap::new();
    for (i, unit) in units.iter().enumerate() {
        if unit_names.insert(unit.name, i).is_some() {
            return Err(graph_error(
                format!(
                    "unit name '{}' is used twice; give each unit a name of its own",
                    unit.name
                ),
                at(i, "name", 0),
            ));
        }
    }

    // Who makes each stream.
    let mut makers: HashMap<&str, Maker> = HashMap::new();
    for (i, feed) in feeds.iter().enumerate() {
        makers.insert(feed, Maker::Feed(i));
    }
    for (u, unit) in units.iter().enumerate() {
        for (k, outlet) in unit.outlets.iter().enumerate() {
            let here = at(u, "to", k);
            match makers.get(outlet.as_str()) {
                Some(Maker::Feed(_)) => {
                    return Err(graph_error(
                        format!(
                            "stream '{outlet}' is both a feed and an outlet of unit '{}'; rename \
                             the feed or the unit outlet",
                            unit.name
                        ),
                        here,
                    ))
                }
                Some(Maker::Unit(other)) => {
                    return Err(graph_error(
                        format!(
                            "stream '{outlet}' is made twice: by unit '{}' and by unit '{}'; \
                             each stream must come from exactly one feed or unit",
                            units[*other].name, unit.name
                        ),
                        here,
                    ))
                }
                None => {
                    makers.insert(outlet, Maker::Unit(u));
                }
            }
        }
    }

    // Who uses each stream.
    let mut users: HashMap<&str, usize> = HashMap::new();
    for (u, unit) in units.iter().enumerate() {
        for (k, inlet) in unit.inlets.iter().enumerate() {
            if !makers.contains_key(inlet.as_str()) {
                return Err(graph_error(
                    format!(
                        "stream '{inlet}', an inlet of unit '{}', is never made; it must be a \
                         feed or the outlet of a unit (check the spelling)",
                        unit.name
                    ),
                    at(u, "from", k),
                ));
            }
            if let Some(other) = users.insert(inlet, u) {
                return Err(graph_error(
                    format!(
                        "stream '{inlet}' is used twice: by unit '{}' and by unit '{}'; a stream \
                         goes to at most one unit (use a splitter to divide it)",
                        units[other].name, unit.name
                    ),
                    at(u, "from", k),
                ));
            }
        }
    }

    // The petgraph graph.
    let mut graph: DiGraph<Node, String> = DiGraph::new();
    let feed_nodes: Vec<NodeIndex> = (0..feeds.len())
        .map(|i| graph.add_node(Node::Feed(i)))
        .collect();
    let unit_nodes: Vec<NodeIndex> = (0..units.len())
        .map(|i| graph.add_node(Node::Unit(i)))
        .collect();
    let maker_node = |m: Maker| match m {
        Maker::Feed(i) => feed_nodes[i],
        Maker::Unit(i) => unit_nodes[i],
    };
    let mut products = Vec::new();
    let mut add_stream = |graph: &mut DiGraph<Node, String>, name: &str, from: NodeIndex| {
        let to = match users.get(name) {
            Some(u) => unit_nodes[*u],
            None => {
                products.push(name.to_string());
                graph.add_node(Node::Product)
            }
        };
        graph.add_edge(from, to, name.to_string());
    };
    for (i, feed) in feeds.iter().enumerate() {
        add_stream(&mut graph, feed, feed_nodes[i]);
    }
    for (u, unit) in units.iter().enumerate() {
        for outlet in unit.outlets {
            add_stream(&mut graph, outlet, maker_node(Maker::Unit(u)));
        }
    }

    let heats = heat_links(&unit_names, units)?;
    let mut links = Vec::new();
    for (u, heated) in heats.iter().enumerate() {
        for &h in heated {
            let label = format!("heat from {} to {}", units[u].name, units[h].name);
            links.push(graph.add_edge(unit_nodes[h], unit_nodes[u], label));
        }
    }

    let tearing = super::tears::tear(&graph, named_tears, &links).map_err(|e| GraphError {
        error: Box::new(e),
        at: None,
    })?;
    let order = solve_order(&graph, &unit_nodes, units, &tearing.tears)?;
    // Products listed feeds first, then in solve order.
    let products: Vec<String> = feeds
        .iter()
        .map(|f| f.to_string())
        .chain(order.iter().flat_map(|&u| units[u].outlets.iter().cloned()))
        .filter(|name| products.contains(name))
        .collect();
    Ok(FlowGraph {
        graph,
        order,
        products,
        heats,
        tearing,
    })
}

/// The `heats` links by unit index: each name must be another unit, heated by one unit only.
fn heat_links(
    unit_names: &HashMap<&str, usize>,
    units: &[UnitPorts<'_>],
) -> Result<Vec<Vec<usize>>, GraphError> {
    let mut heater: Vec<Option<usize>> = vec![None; units.len()];
    let mut out = Vec::with_capacity(units.len());
    for (u, unit) in units.iter().enumerate() {
        let mut list = Vec::with_capacity(unit.heats.len());
        for (k, name) in unit.heats.iter().enumerate() {
            let Some(&h) = unit_names.get(name.as_str()) else {
                return Err(graph_error(
                    format!(
                        "unit '{}' heats '{name}', which is not a unit of this flowsheet (check \
                         the spelling)",
                        unit.name
                    ),
                    at(u, "heats", k),
                ));
            };
            if h == u {
                return Err(graph_error(
                    format!("unit '{}' cannot heat itself", unit.name),
                    at(u, "heats", k),
                ));
            }
            if let Some(other) = heater[h].replace(u) {
                return Err(graph_error(
                    format!(
                        "unit '{name}' is heated twice: by '{}' and by '{}'; one unit supplies \
                         its duty",
                        units[other].name, unit.name
                    ),
                    at(u, "heats", k),
                ));
            }
            list.push(h);
        }
        out.push(list);
    }
    Ok(out)
}

/// Kahn's algorithm over the units, taking the first unit in file order among those ready; the
/// `tears` do not count as connections.
fn solve_order(
    graph: &DiGraph<Node, String>,
    unit_nodes: &[NodeIndex],
    units: &[UnitPorts<'_>],
    tears: &[String],
) -> Result<Vec<usize>, GraphError> {
    let torn = |e: &petgraph::graph::EdgeReference<'_, String>| tears.contains(e.weight());
    let mut waiting: Vec<usize> = unit_nodes
        .iter()
        .map(|&n| {
            graph
                .edges_directed(n, Direction::Incoming)
                .filter(|e| matches!(graph[petgraph::visit::EdgeRef::source(e)], Node::Unit(_)))
                .filter(|e| !torn(e))
                .count()
        })
        .collect();
    let mut done = vec![false; units.len()];
    let mut order = Vec::with_capacity(units.len());
    while let Some(next) = (0..units.len()).find(|&u| !done[u] && waiting[u] == 0) {
        done[next] = true;
        order.push(next);
        for edge in graph.edges_directed(unit_nodes[next], Direction::Outgoing) {
            if torn(&edge) {
                continue;
            }
            if let Node::Unit(user) = graph[petgraph::visit::EdgeRef::target(&edge)] {
                waiting[user] -= 1;
            }
        }
    }
    if order.len() < units.len() {
        return Err(GraphError {
            error: Box::new(cycle_error(graph)),
            at: None,
        });
    }
    Ok(order)
}

/// Name the streams of every cycle (strongly connected component with an edge inside).
fn cycle_error(graph: &DiGraph<Node, String>) -> Error {
    let mut cycles = Vec::new();
    for component in petgraph::algo::tarjan_scc(graph) {
        let inside = |n: NodeIndex| component.contains(&n);
        let mut streams: Vec<(usize, &str)> = graph
            .edge_indices()
            .filter_map(|e| {
                let (a, b) = graph.edge_endpoints(e)?;
                (inside(a) && inside(b)).then(|| (e.index(), graph[e].as_str()))
            })
            .collect();
        if streams.is_empty() {
            continue;
        }
        streams.sort();
        let names: Vec<String> = streams.iter().map(|(_, s)| format!("'{s}'")).collect();
        cycles.push(names.join(", "));
    }
    flowsheet_error(format!(
        "the units form a cycle through streams {} that the tear streams do not break \
         (internal error)",
        cycles.join("; and through ")
    ))
}

fn flowsheet_error(reason: String) -> Error {
    Error::Flowsheet { reason }
}

fn graph_error(reason: String, at: Option<At>) -> GraphError {
    GraphError {
        error: Box::new(flowsheet_error(reason)),
        at,
    }
}

fn at(unit: usize, key: &'static str, index: usize) -> Option<At> {
    Some(At { unit, key, index })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ports<'a>(name: &'a str, inlets: &'a [String], outlets: &'a [String]) -> UnitPorts<'a> {
        UnitPorts {
            name,
            inlets,
            outlets,
            heats: &[],
        }
    }

    fn s(names: &[&str]) -> Vec<String> {
        names.iter().map(|n| n.to_string()).collect()
    }

    #[test]
    fn order_follows_connections_then_file_order() {
        let (a_in, a_out) = (s(&["mid"]), s(&["out"]));
        let (b_in, b_out) = (s(&["feed"]), s(&["mid"]));
        let units = [ports("a", &a_in, &a_out), ports("b", &b_in, &b_out)];
        let g = build(&["feed"], &units).unwrap();
        assert_eq!(g.order, vec![1, 0]);
        assert_eq!(g.products, vec!["out"]);
        // Nodes: one feed, two units, one product end; edges: three streams.
        assert_eq!(g.graph.node_count(), 4);
        assert_eq!(g.graph.edge_count(), 3);
    }

    #[test]
    fn a_cycle_is_torn_and_ordered_without_its_tear() {
        let (a_in, a_out) = (s(&["feed", "back"]), s(&["mid"]));
        let (b_in, b_out) = (s(&["mid"]), s(&["back", "out"]));
        let units = [ports("a", &a_in, &a_out), ports("b", &b_in, &b_out)];
        let g = build(&["feed"], &units).unwrap();
        assert_eq!(g.tearing.tears, vec!["back"]);
        assert_eq!(g.order, vec![0, 1]);
        // Torn at `mid` instead, unit b comes first.
        let g = build_with(&["feed"], &units, &s(&["mid"])).unwrap();
        assert_eq!(g.order, vec![1, 0]);
        let e = build_with(&["feed"], &units, &s(&["out"]))
            .unwrap_err()
            .error
            .to_string();
        assert!(e.contains("'out'") && e.contains("not in a cycle"), "{e}");
    }

    #[test]
    fn a_heated_unit_is_solved_before_its_heater() {
        let (f_in, f_out) = (s(&["fuel"]), s(&["flue"]));
        let (r_in, r_out) = (s(&["feed"]), s(&["out"]));
        let heats = s(&["reformer"]);
        let mut furnace = ports("furnace", &f_in, &f_out);
        furnace.heats = &heats;
        let units = [furnace, ports("reformer", &r_in, &r_out)];
        let g = build(&["feed", "fuel"], &units).unwrap();
        assert_eq!(g.order, vec![1, 0]);
        assert_eq!(g.heats, vec![vec![1], vec![]]);
        let wrong = s(&["reformr"]);
        let mut furnace = ports("furnace", &f_in, &f_out);
        furnace.heats = &wrong;
        let units = [furnace, ports("reformer", &r_in, &r_out)];
        let e = build(&["feed", "fuel"], &units).unwrap_err();
        assert!(
            e.error.to_string().contains("heats 'reformr'"),
            "{}",
            e.error
        );
        assert_eq!(e.at, at(0, "heats", 0));
    }

    #[test]
    fn unused_feed_is_a_product() {
        let g = build(&["a", "b"], &[]).unwrap();
        assert_eq!(g.products, vec!["a", "b"]);
    }
}
