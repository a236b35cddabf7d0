//! Tear streams: the streams whose values a recycle iteration guesses, so that the rest of the
//! flowsheet can be solved in one topological order.
//!
//! The cycles are the strongly connected components of the flowsheet graph that hold an edge
//! inside (Tarjan 1972, "Depth-first search and linear graph algorithms", SIAM J. Computing
//! 1(2)). For each such component the tears are chosen as a smallest feedback arc set: the
//! streams inside it are sorted by the unit they come back to (file order), then by the unit
//! that makes them (file order), then by their place in the file, and the subsets of one
//! stream, then two, ... are tried in that lexicographic order; the first subset whose removal
//! leaves the component without a cycle is taken. So a plain loop is torn at the stream that
//! returns to its earliest unit (usually the recycle into a mixer), and a loop torn anywhere
//! else is only chosen when it needs fewer tears. Finding a smallest feedback arc set is
//! NP-hard (Karp 1972, "Reducibility among combinatorial problems"); flowsheet loops are small,
//! but should a component need more than [`SEARCH_BUDGET`] trials, the back edges of a
//! depth-first search in file order are taken instead (removing them always leaves the graph
//! without a cycle; Tarjan 1972).
//!
//! A cycle that no stream from outside enters (a closed loop) is an error: its flow would be
//! undetermined.
//!
//! The user may name the tears (`solver: tear-streams: [...]`): each must be a stream inside a
//! cycle, and together they must break every cycle; otherwise the error names a cycle that is
//! left.

use petgraph::graph::{DiGraph, EdgeIndex, NodeIndex};
use petgraph::visit::EdgeRef;

use super::graph::Node;
use crate::error::Error;

/// Subsets tried per component before the depth-first fallback.
pub const SEARCH_BUDGET: usize = 20_000;

/// The tears of a flowsheet graph and the units inside its cycles.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Tearing {
    /// Tear stream names: named ones in the order given, chosen ones by component then in the
    /// order of the sort above.
    pub tears: Vec<String>,
    /// Units (file order indices) that lie on a cycle.
    pub looped_units: Vec<usize>,
}

/// Choose (or check the named) tear streams of `graph`. A graph without a cycle has no tears;
/// naming a tear there is an error. `links` are edges that are not streams (a furnace's `heats`
/// link from the reformer it fires): they close cycles but are never torn.
pub fn tear(
    graph: &DiGraph<Node, String>,
    named: &[String],
    links: &[EdgeIndex],
) -> Result<Tearing, Error> {
    let components: Vec<Vec<NodeIndex>> = petgraph::algo::tarjan_scc(graph)
        .into_iter()
        .filter(|c| !inner_edges(graph, c).is_empty())
        .collect();
    let mut looped_units: Vec<usize> = components
        .iter()
        .flatten()
        .filter_map(|&n| match graph[n] {
            Node::Unit(u) => Some(u),
            _ => None,
        })
        .collect();
    looped_units.sort_unstable();
    // A loop nothing flows into would carry an undetermined (or zero) flow.
    for c in &components {
        let fed = graph
            .edge_references()
            .any(|e| c.contains(&e.target()) && !c.contains(&e.source()));
        if !fed {
            let streams: Vec<String> = inner_edges(graph, c)
                .iter()
                .map(|&e| format!("'{}'", graph[e]))
                .collect();
            return Err(flowsheet_error(format!(
                "the units form a cycle through streams {} that nothing flows into; recycles \
                 need a feed or a stream from outside the loop (check the `from` lists)",
                streams.join(", ")
            )));
        }
    }
    let inside = |e: EdgeIndex| {
        graph
            .edge_endpoints(e)
            .is_some_and(|(a, b)| components.iter().any(|c| c.contains(&a) && c.contains(&b)))
    };
    if !named.is_empty() {
        let mut edges = Vec::with_capacity(named.len());
        for (i, name) in named.iter().enumerate() {
            if named[..i].contains(name) {
                return Err(flowsheet_error(format!(
                    "tear stream '{name}' is named twice under `solver: tear-streams`"
                )));
            }
            let Some(e) = graph
                .edge_indices()
                .find(|&e| graph[e] == *name && !links.contains(&e))
            else {
                return Err(flowsheet_error(format!(
                    "tear stream '{name}' (`solver: tear-streams`) is not a stream of the \
                     flowsheet (check the spelling)"
                )));
            };
            if !inside(e) {
                return Err(flowsheet_error(format!(
                    "tear stream '{name}' (`solver: tear-streams`) is not in a cycle; name only \
                     streams that run around a loop, or leave `tear-streams` out to have them \
                     chosen"
                )));
            }
            edges.push(e);
        }
        let mut cut = vec![false; graph.edge_count()];
        edges.iter().for_each(|e| cut[e.index()] = true);
        if let Some(cycle) = remaining_cycle(graph, &cut) {
            return Err(flowsheet_error(format!(
                "the tear streams named under `solver: tear-streams` leave a cycle through \
                 streams {cycle}; name a stream of it as a tear too"
            )));
        }
        return Ok(Tearing {
            tears: named.to_vec(),
            looped_units,
        });
    }
    let mut tears = Vec::new();
    for c in &components {
        let mut edges = inner_edges(graph, c);
        edges.retain(|e| !links.contains(e));
        edges.sort_by_key(|&e| {
            let (a, b) = graph
                .edge_endpoints(e)
                .unwrap_or((NodeIndex::end(), NodeIndex::end()));
            (unit_of(graph, b), unit_of(graph, a), e.index())
        });
        let chosen = smallest_cut(graph, c, &edges).unwrap_or_else(|| back_edges(graph, c));
        if let Some(&link) = chosen.iter().find(|e| links.contains(e)) {
            return Err(flowsheet_error(format!(
                "no tear streams were found for the cycle through {}: its fallback would tear \
                 the link '{}'; name the tear streams under `solver: tear-streams`",
                inner_edges(graph, c)
                    .iter()
                    .map(|&e| format!("'{}'", graph[e]))
                    .collect::<Vec<_>>()
                    .join(", "),
                graph[link]
            )));
        }
        tears.extend(chosen.into_iter().map(|e| graph[e].clone()));
    }
    Ok(Tearing {
        tears,
        looped_units,
    })
}

fn flowsheet_error(reason: String) -> Error {
    Error::Flowsheet { reason }
}

/// File index of a unit node (feeds and product ends never lie on a cycle).
fn unit_of(graph: &DiGraph<Node, String>, n: NodeIndex) -> usize {
    match graph.node_weight(n) {
        Some(Node::Unit(u)) => *u,
        _ => usize::MAX,
    }
}

/// Edges with both ends in `component`, in edge order.
fn inner_edges(graph: &DiGraph<Node, String>, component: &[NodeIndex]) -> Vec<EdgeIndex> {
    graph
        .edge_references()
        .filter(|e| component.contains(&e.source()) && component.contains(&e.target()))
        .map(|e| e.id())
        .collect()
}

/// Whether `nodes` nodes joined by `edges` (local indices) hold no cycle (Kahn 1962).
fn acyclic(nodes: usize, edges: &[(usize, usize)]) -> bool {
    let mut waiting = vec![0usize; nodes];
    edges.iter().for_each(|&(_, b)| waiting[b] += 1);
    let mut ready: Vec<usize> = (0..nodes).filter(|&i| waiting[i] == 0).collect();
    let mut done = 0;
    while let Some(i) = ready.pop() {
        done += 1;
        for &(a, b) in edges {
            if a == i {
                waiting[b] -= 1;
                if waiting[b] == 0 {
                    ready.push(b);
                }
            }
        }
    }
    done == nodes
}

/// The first subset (fewest streams, then lexicographic in `edges`' order) whose removal leaves
/// the component without a cycle; `None` when the search budget runs out.
fn smallest_cut(
    graph: &DiGraph<Node, String>,
    component: &[NodeIndex],
    edges: &[EdgeIndex],
) -> Option<Vec<EdgeIndex>> {
    let pos = |n: NodeIndex| component.iter().position(|&c| c == n).unwrap_or(0);
    let local: Vec<(usize, usize)> = edges
        .iter()
        .map(|&e| {
            let (a, b) = graph
                .edge_endpoints(e)
                .unwrap_or((component[0], component[0]));
            (pos(a), pos(b))
        })
        .collect();
    let mut trials = 0usize;
    let mut kept = Vec::with_capacity(local.len());
    for k in 1..=edges.len() {
        let mut pick: Vec<usize> = (0..k).collect();
        loop {
            trials += 1;
            if trials > SEARCH_BUDGET {
                return None;
            }
            kept.clear();
            kept.extend(
                local
                    .iter()
                    .enumerate()
                    .filter(|(i, _)| !pick.contains(i))
                    .map(|(_, &ab)| ab),
            );
            if acyclic(component.len(), &kept) {
                return Some(pick.iter().map(|&i| edges[i]).collect());
            }
            // Next combination of k out of edges.len() in lexicographic order.
            let n = edges.len();
            let Some(i) = (0..k).rev().find(|&i| pick[i] < n - k + i) else {
                break;
            };
            pick[i] += 1;
            for j in i + 1..k {
                pick[j] = pick[j - 1] + 1;
            }
        }
    }
    None
}

/// Back edges of a depth-first search over the component, started at its units in file order
/// and following streams in the order of the units they lead to.
fn back_edges(graph: &DiGraph<Node, String>, component: &[NodeIndex]) -> Vec<EdgeIndex> {
    let mut roots = component.to_vec();
    roots.sort_by_key(|&n| unit_of(graph, n));
    // 0 unvisited, 1 on the stack, 2 done.
    let mut state = vec![0u8; graph.node_count()];
    let mut back = Vec::new();
    let out_edges = |n: NodeIndex| {
        let mut v: Vec<(NodeIndex, EdgeIndex)> = graph
            .edges(n)
            .filter(|e| component.contains(&e.target()))
            .map(|e| (e.target(), e.id()))
            .collect();
        v.sort_by_key(|&(t, e)| (unit_of(graph, t), e.index()));
        v
    };
    for root in roots {
        if state[root.index()] != 0 {
            continue;
        }
        let mut stack = vec![(root, out_edges(root), 0usize)];
        state[root.index()] = 1;
        while let Some((node, edges, next)) = stack.last_mut() {
            let Some(&(target, edge)) = edges.get(*next) else {
                state[node.index()] = 2;
                stack.pop();
                continue;
            };
            *next += 1;
            match state[target.index()] {
                0 => {
                    state[target.index()] = 1;
                    let e = out_edges(target);
                    stack.push((target, e, 0));
                }
                1 => back.push(edge),
                _ => {}
            }
        }
    }
    back
}

/// The streams of a cycle left in `graph` once the edges marked in `cut` are removed, quoted
/// and comma separated; `None` when no cycle is left.
fn remaining_cycle(graph: &DiGraph<Node, String>, cut: &[bool]) -> Option<String> {
    let mut rest = graph.clone();
    rest.retain_edges(|_, e| !cut[e.index()]);
    petgraph::algo::tarjan_scc(&rest).into_iter().find_map(|c| {
        let edges = inner_edges(&rest, &c);
        (!edges.is_empty()).then(|| {
            edges
                .iter()
                .map(|&e| format!("'{}'", rest[e]))
                .collect::<Vec<_>>()
                .join(", ")
        })
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A graph of units, `edges` (from unit, to unit, stream name), and a feed into each unit.
    fn units(n: usize, edges: &[(usize, usize, &str)]) -> DiGraph<Node, String> {
        let mut g = DiGraph::new();
        let nodes: Vec<NodeIndex> = (0..n).map(|i| g.add_node(Node::Unit(i))).collect();
        for &(a, b, s) in edges {
            g.add_edge(nodes[a], nodes[b], s.to_string());
        }
        for (i, &u) in nodes.iter().enumerate() {
            let f = g.add_node(Node::Feed(i));
            g.add_edge(f, u, format!("feed-{i}"));
        }
        g
    }

    #[test]
    fn a_closed_loop_is_refused() {
        let mut g = DiGraph::new();
        let a = g.add_node(Node::Unit(0));
        let b = g.add_node(Node::Unit(1));
        g.add_edge(a, b, "there".to_string());
        g.add_edge(b, a, "back".to_string());
        let e = tear(&g, &[], &[]).unwrap_err().to_string();
        assert!(
            e.contains("cycle through streams 'there', 'back' that nothing flows into"),
            "{e}"
        );
    }

    #[test]
    fn a_graph_without_cycles_has_no_tears() {
        let g = units(3, &[(0, 1, "a"), (1, 2, "b")]);
        assert_eq!(tear(&g, &[], &[]).unwrap(), Tearing::default());
        let e = tear(&g, &["a".into()], &[]).unwrap_err().to_string();
        assert!(e.contains("'a'") && e.contains("not in a cycle"), "{e}");
    }

    #[test]
    fn a_loop_is_torn_where_it_returns_to_its_earliest_unit() {
        // mixer (0) -> heater (1) -> splitter (2) -> back to the mixer.
        let g = units(3, &[(0, 1, "mixed"), (1, 2, "hot"), (2, 0, "recycle")]);
        let t = tear(&g, &[], &[]).unwrap();
        assert_eq!(t.tears, vec!["recycle"]);
        assert_eq!(t.looped_units, vec![0, 1, 2]);
        // The same loop written with the splitter first still tears the stream into unit 0.
        let g = units(3, &[(1, 2, "mixed"), (2, 0, "hot"), (0, 1, "recycle")]);
        assert_eq!(tear(&g, &[], &[]).unwrap().tears, vec!["hot"]);
    }

    #[test]
    fn one_stream_shared_by_two_loops_is_the_one_tear() {
        // Two loops 0 -> 1 -> 2 -> 0 and 0 -> 1 -> 3 -> 0 share the stream 0 -> 1; cutting it
        // breaks both, where the streams returning to unit 0 would need two tears.
        let g = units(
            4,
            &[
                (0, 1, "shared"),
                (1, 2, "p"),
                (2, 0, "back-1"),
                (1, 3, "q"),
                (3, 0, "back-2"),
            ],
        );
        assert_eq!(tear(&g, &[], &[]).unwrap().tears, vec!["shared"]);
    }

    #[test]
    fn named_tears_are_checked() {
        let g = units(3, &[(0, 1, "mixed"), (1, 2, "hot"), (2, 0, "recycle")]);
        assert_eq!(tear(&g, &["hot".into()], &[]).unwrap().tears, vec!["hot"]);
        let e = tear(&g, &["cold".into()], &[]).unwrap_err().to_string();
        assert!(e.contains("'cold'") && e.contains("not a stream"), "{e}");
        let e = tear(&g, &["hot".into(), "hot".into()], &[])
            .unwrap_err()
            .to_string();
        assert!(e.contains("named twice"), "{e}");
        // Two loops, one tear named: the other loop is named in the error.
        let g = units(
            4,
            &[
                (0, 1, "a"),
                (1, 0, "b"),
                (2, 3, "c"),
                (3, 2, "d"),
                (1, 2, "e"),
            ],
        );
        let e = tear(&g, &["b".into()], &[]).unwrap_err().to_string();
        assert!(e.contains("leave a cycle through streams 'c', 'd'"), "{e}");
    }

    #[test]
    fn the_fallback_breaks_every_cycle() {
        // A complete graph of five units (20 streams, 10 tears at least).
        let names: Vec<String> = (0..20).map(|i| format!("s{i}")).collect();
        let mut edges = Vec::new();
        let mut k = 0;
        for a in 0..5 {
            for b in 0..5 {
                if a != b {
                    edges.push((a, b, names[k].as_str()));
                    k += 1;
                }
            }
        }
        let g = units(5, &edges);
        let comp: Vec<NodeIndex> = g.node_indices().collect();
        let back = back_edges(&g, &comp);
        let mut cut = vec![false; g.edge_count()];
        back.iter().for_each(|e| cut[e.index()] = true);
        assert_eq!(remaining_cycle(&g, &cut), None);
        // A depth-first search from unit 0 takes the 10 streams pointing back (a -> b, b < a).
        assert_eq!(back.len(), 10);
        assert!(tear(&g, &[], &[]).unwrap().tears.len() >= 10);
    }
}
