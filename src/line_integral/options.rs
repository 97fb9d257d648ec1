//! What a line integral computes and how: the kind of integral, the quadrature rule and its
//! companion, and the one constructor that checks every option ([`Options::new`]).

use crate::error::{KernelError, Result};
use crate::piecewise::gauss_legendre;

/// Largest number of Gauss–Legendre nodes per segment.
pub const MAX_NODES: usize = 5;

/// Gauss–Legendre nodes per segment when the caller gives none (exact for a bi/trilinear field on
/// a segment inside one cell).
pub const DEFAULT_NODES: usize = 2;

/// Name of the node rule of gridded and callable fields.
pub const FIELD_RULE: &str = "gauss-legendre";

/// What is integrated.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// ∫ F·dr of a vector field with the path's dimension.
    Work,
    /// ∫ f ds of a scalar field.
    Scalar,
}

impl Kind {
    /// Parse `"work"` or `"scalar"`.
    pub fn parse(name: &str) -> Result<Self> {
        match name {
            "work" => Ok(Kind::Work),
            "scalar" => Ok(Kind::Scalar),
            other => Err(KernelError::Option {
                argument: "kind",
                detail: format!("expected one of ('work', 'scalar'), got '{other}'"),
            }),
        }
    }

    /// Name of the integrand argument of the Python functions (`force` for work, `f`).
    pub fn argument(self) -> &'static str {
        match self {
            Kind::Work => "force",
            Kind::Scalar => "f",
        }
    }

    /// Values per row or node: the path's dimension for work, one for a scalar integral.
    pub fn comps(self, dim: usize) -> usize {
        match self {
            Kind::Work => dim,
            Kind::Scalar => 1,
        }
    }
}

/// Quadrature of sampled values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Rule {
    /// Linear interpolants of path and values (second order).
    Trapezoid,
    /// Four-point cubic interpolants (Gill–Miller), product integrated exactly (fourth order).
    Cubic,
}

impl Rule {
    /// Parse `"trapezoid"` or `"cubic"`.
    pub fn parse(name: &str) -> Result<Self> {
        match name {
            "trapezoid" => Ok(Rule::Trapezoid),
            "cubic" => Ok(Rule::Cubic),
            other => Err(KernelError::Option {
                argument: "rule",
                detail: format!("expected one of ('trapezoid', 'cubic'), got '{other}'"),
            }),
        }
    }

    /// The name [`Rule::parse`] reads.
    pub fn name(self) -> &'static str {
        match self {
            Rule::Trapezoid => "trapezoid",
            Rule::Cubic => "cubic",
        }
    }
}

/// How the integrand is given, which decides the quadrature options that apply.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Integrand {
    /// Values at the path's rows: a [`Rule`].
    Sampled,
    /// A field evaluated anywhere (a grid, or values at handed-out nodes): Gauss–Legendre nodes.
    Field,
}

/// Options shared by the integrals.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Work or scalar integral.
    pub kind: Kind,
    /// Add the straight segment from the last usable row of each track back to its first.
    pub closed: bool,
    /// Also return the running integral at every row.
    pub cumulative: bool,
    /// Also evaluate the companion rule and report |main − companion| per track.
    pub estimate: bool,
    /// Name of the integrand argument, for messages.
    pub argument: &'static str,
    /// Rule for sampled values.
    pub rule: Rule,
    /// Gauss–Legendre nodes per segment for fields (1 to [`MAX_NODES`]).
    pub nodes: usize,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            kind: Kind::Work,
            closed: false,
            cumulative: false,
            estimate: true,
            argument: "force",
            rule: Rule::Trapezoid,
            nodes: DEFAULT_NODES,
        }
    }
}

/// `nodes` as a node count per segment, or an error naming the argument.
pub fn check_nodes(nodes: i64) -> Result<usize> {
    match usize::try_from(nodes) {
        Ok(q) if (1..=MAX_NODES).contains(&q) => Ok(q),
        _ => Err(KernelError::Option {
            argument: "nodes",
            detail: format!("must be 1 to {MAX_NODES} per segment, got {nodes}"),
        }),
    }
}

impl Options {
    /// Every option of a line integral, checked once: `kind` is `"work"` or `"scalar"`; sampled
    /// values take a `rule` (default trapezoid) and no `nodes`; fields take `nodes` (default
    /// [`DEFAULT_NODES`], at most [`MAX_NODES`]) and no rule other than [`FIELD_RULE`].
    ///
    /// # Examples
    ///
    /// ```
    /// use osculate::line_integral::{Integrand, Options, Rule};
    /// let o = Options::new("work", Integrand::Sampled, Some("cubic"), None, false, false, true);
    /// assert_eq!(o.unwrap().rule, Rule::Cubic);
    /// let e = Options::new("work", Integrand::Field, None, Some(9), false, false, true);
    /// assert_eq!(e.unwrap_err().to_string(), "nodes: must be 1 to 5 per segment, got 9");
    /// ```
    pub fn new(
        kind: &str,
        integrand: Integrand,
        rule: Option<&str>,
        nodes: Option<i64>,
        closed: bool,
        cumulative: bool,
        estimate: bool,
    ) -> Result<Self> {
        let kind = Kind::parse(kind)?;
        let mut o = Options {
            kind,
            closed,
            cumulative,
            estimate,
            argument: kind.argument(),
            ..Options::default()
        };
        match integrand {
            Integrand::Sampled => {
                if nodes.is_some() {
                    return Err(KernelError::Option {
                        argument: "nodes",
                        detail: "applies to gridded and callable fields; sampled values use rule="
                            .into(),
                    });
                }
                o.rule = rule.map_or(Ok(Rule::Trapezoid), Rule::parse)?;
            }
            Integrand::Field => {
                if let Some(r) = rule.filter(|&r| r != FIELD_RULE) {
                    return Err(KernelError::Option {
                        argument: "rule",
                        detail: format!(
                            "gridded and callable fields use '{FIELD_RULE}' with nodes=; \
                             ('trapezoid', 'cubic') are for sampled values, got '{r}'"
                        ),
                    });
                }
                o.nodes = nodes.map_or(Ok(DEFAULT_NODES), check_nodes)?;
            }
        }
        Ok(o)
    }

    /// The quadrature in words, e.g. `"cubic"` or `"gauss-legendre, 2 nodes per segment"`.
    pub fn describe(&self, integrand: Integrand) -> String {
        match integrand {
            Integrand::Sampled => self.rule.name().into(),
            Integrand::Field => format!(
                "{FIELD_RULE}, {} node{} per segment",
                self.nodes,
                if self.nodes > 1 { "s" } else { "" }
            ),
        }
    }
}

/// Gauss–Legendre nodes on [−1, 1] for the main rule and its companion, merged: weights are 0
/// where a rule has no node. The companion has one node fewer (two for a 1-node main rule).
#[derive(Debug, Clone, PartialEq)]
pub struct NodeRule {
    /// Abscissas on [−1, 1].
    pub xi: Vec<f64>,
    /// Weights of the main rule.
    pub main: Vec<f64>,
    /// Weights of the companion rule (empty when no estimate is asked for).
    pub companion: Vec<f64>,
}

impl NodeRule {
    /// `q`-node Gauss–Legendre (1 ≤ q ≤ [`MAX_NODES`]), with its companion when `estimate`.
    pub fn new(q: usize, estimate: bool) -> Result<Self> {
        let q = check_nodes(i64::try_from(q).unwrap_or(i64::MAX))?;
        let (x, w) = gauss_legendre(q);
        let mut rule = NodeRule {
            xi: x.to_vec(),
            main: w.to_vec(),
            companion: Vec::new(),
        };
        if estimate {
            let (xc, wc) = gauss_legendre(if q == 1 { 2 } else { q - 1 });
            rule.companion = vec![0.0; q];
            for (&a, &b) in xc.iter().zip(wc) {
                rule.xi.push(a);
                rule.main.push(0.0);
                rule.companion.push(b);
            }
        }
        Ok(rule)
    }

    /// Nodes per segment.
    pub fn len(&self) -> usize {
        self.xi.len()
    }

    /// Never empty.
    pub fn is_empty(&self) -> bool {
        self.xi.is_empty()
    }
}
