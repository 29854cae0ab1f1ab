//! Calculation order: the recycles as strongly connected components of the
//! equipment graph, tear streams chosen inside each by a depth-first search from
//! the unit where material enters the recycle, and the order of the torn graph.

use crate::flowsheet::Plant;
use petgraph::algo::tarjan_scc;
use petgraph::graph::NodeIndex;
use petgraph::Direction;
use std::collections::BTreeSet;

/// The solver's plan for one flowsheet.
#[derive(Debug, Clone, PartialEq)]
pub struct Sequence {
    /// Streams whose values are iterated.
    pub tears: Vec<usize>,
    /// Units in calculation order.
    pub order: Vec<usize>,
    /// The recycles: units of each strongly connected component with a cycle.
    pub recycles: Vec<Vec<usize>>,
}

/// Finds recycles, tears and the calculation order.
pub fn plan(plant: &Plant) -> Sequence {
    let graph = &plant.graph;
    let mut tears = BTreeSet::new();
    let mut recycles = Vec::new();
    for component in tarjan_scc(graph) {
        let members: BTreeSet<NodeIndex> = component.iter().copied().collect();
        let has_cycle = component.len() > 1
            || graph
                .edges_connecting(component[0], component[0])
                .next()
                .is_some();
        if !has_cycle {
            continue;
        }
        let mut units: Vec<usize> = component.iter().map(|n| graph[*n]).collect();
        units.sort_unstable();
        recycles.push(units);
        // Start where material enters from outside (a mixer fed by make-up), else at
        // the first unit in file order.
        let entry = component
            .iter()
            .copied()
            .filter(|n| {
                graph
                    .neighbors_directed(*n, Direction::Incoming)
                    .any(|m| !members.contains(&m))
            })
            .min_by_key(|n| graph[*n])
            .unwrap_or_else(|| {
                *component
                    .iter()
                    .min_by_key(|n| graph[**n])
                    .unwrap_or(&component[0])
            });
        // Iterative depth-first search: an edge to a unit on the current path closes a
        // cycle, and is torn.
        let mut on_path = BTreeSet::new();
        let mut done = BTreeSet::new();
        let mut starts = vec![entry];
        starts.extend(component.iter().copied());
        for start in starts {
            if done.contains(&start) {
                continue;
            }
            let mut stack: Vec<(NodeIndex, Vec<(NodeIndex, usize)>)> =
                vec![(start, outgoing(plant, start, &members))];
            on_path.insert(start);
            while let Some((node, children)) = stack.last_mut() {
                if let Some((next, stream)) = children.pop() {
                    if on_path.contains(&next) {
                        tears.insert(stream);
                    } else if !done.contains(&next) {
                        on_path.insert(next);
                        let grandchildren = outgoing(plant, next, &members);
                        stack.push((next, grandchildren));
                    }
                } else {
                    let finished = *node;
                    on_path.remove(&finished);
                    done.insert(finished);
                    stack.pop();
                }
            }
        }
    }
    // Kahn's algorithm over the torn graph, ties broken by file order.
    let n = plant.units.len();
    let mut indegree = vec![0usize; n];
    for (i, s) in plant.streams.iter().enumerate() {
        if !tears.contains(&i) {
            indegree[s.to.unit] += 1;
        }
    }
    let mut ready: BTreeSet<usize> = (0..n).filter(|u| indegree[*u] == 0).collect();
    let mut order = Vec::with_capacity(n);
    while let Some(&u) = ready.iter().next() {
        ready.remove(&u);
        order.push(u);
        for &s in &plant.units[u].outlets {
            if tears.contains(&s) {
                continue;
            }
            let to = plant.streams[s].to.unit;
            indegree[to] -= 1;
            if indegree[to] == 0 {
                ready.insert(to);
            }
        }
    }
    Sequence {
        tears: tears.into_iter().collect(),
        order,
        recycles,
    }
}

/// Outgoing edges of a unit inside the component, in reverse file order of their
/// streams (so that the search takes them in file order).
fn outgoing(
    plant: &Plant,
    node: NodeIndex,
    members: &BTreeSet<NodeIndex>,
) -> Vec<(NodeIndex, usize)> {
    let unit = plant.graph[node];
    let mut edges: Vec<(NodeIndex, usize)> = plant.units[unit]
        .outlets
        .iter()
        .map(|&s| (plant.units[plant.streams[s].to.unit].node, s))
        .filter(|(n, _)| members.contains(n))
        .collect();
    edges.reverse();
    edges
}
