//! Nerves, vessels, bone and fluid pockets in the image frame, and how much of the elevation
//! beam each one fills at a pixel.
//!
//! **Elevation integration.** A pixel does not see the centre plane only: it sees the line
//! through it along the elevation axis, weighted by the beam's elevation profile. We take that
//! profile as a Gaussian whose two-way −6 dB full width is the slab thickness T at the pixel's
//! range (σ_amplitude = T/2.355; diffuse echoes add in intensity, so σ_intensity = σ/√2). The
//! line meets a tube or an ellipsoid in one interval [e0, e1], found exactly from a quadratic;
//! the structure's share of the pixel is Φ(e1/σ) − Φ(e0/σ). So an object half in the slab is
//! half as bright, a pocket thinner than the slab is partly filled in by the tissue around it,
//! and nothing has a hard edge at the slab boundary. The texture inside (fascicles, flow) is
//! read at the point of the interval where the beam is strongest (the one nearest e = 0).

use super::math::{hash3, hash_unit, max_f64, min_f64, seed_of, NormalCdf};
use super::posed::{cross, dot, norm, scale, sub, unit_or, Axes, V3};
use crate::scene::{Shape, Structure, StructureKind};

/// One straight piece of a tube, in image coordinates.
#[derive(Debug, Clone)]
pub(crate) struct TubeSegment {
    /// Start point (u, v, e), mm.
    a: V3,
    /// Unit axis direction.
    pub(crate) k: V3,
    /// Axial extent kept, mm from `a` (extended past interior joints so bends have no gaps).
    t_lo: f64,
    t_hi: f64,
    /// Cross-section basis (unit, ⊥ k), fixed to the tissue.
    p1: V3,
    p2: V3,
    /// Image-plane box where the segment can reach the beam: (u_min, u_max, v_min, v_max).
    pub(crate) bbox: [f64; 4],
}

/// A fascicle: centre in the cross-section basis and radius, mm.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Fascicle {
    x: f64,
    y: f64,
    r: f64,
}

/// Fascicles of a nerve with a coarse lookup grid.
#[derive(Debug, Clone)]
pub(crate) struct FascicleLayout {
    pub(crate) fascicles: Vec<Fascicle>,
    /// Radius inside the epineurium, mm.
    pub(crate) inner_radius: f64,
    cell: f64,
    cells: usize,
    starts: Vec<u32>,
    members: Vec<u16>,
}

/// Peripheral nerves: fascicles fill about 45 % of the cross-section (modelling choice after
/// the usual histology picture); roots: about 75 %, little connective tissue between.
const FASCICLE_AREA_NERVE: f64 = 0.45;
const FASCICLE_AREA_ROOT: f64 = 0.75;

impl FascicleLayout {
    /// A layout of `count` fascicles (0 = from the radius) in a nerve of `radius` mm; the
    /// jitter comes from the nerve id, so a nerve keeps its pattern in every frame.
    pub(crate) fn new(radius: f64, count: u32, root: bool, id: &str) -> Self {
        let inner = radius * if root { 0.9 } else { 0.84 };
        let n = if count == 0 {
            // About one fascicle per 1.2 mm² of nerve (modelling choice).
            libm::round(core::f64::consts::PI * radius * radius / 1.2).clamp(1.0, 60.0) as usize
        } else {
            count as usize
        };
        let area = if root {
            FASCICLE_AREA_ROOT
        } else {
            FASCICLE_AREA_NERVE
        };
        let r_mean = inner * (area / n as f64).sqrt();
        let seed = seed_of(id);
        let golden = core::f64::consts::PI * (3.0 - 5.0f64.sqrt());
        let mut fascicles = Vec::with_capacity(n);
        for i in 0..n {
            let h1 = hash_unit(hash3(i as i32, 1, 7, seed));
            let h2 = hash_unit(hash3(i as i32, 2, 7, seed));
            let h3 = hash_unit(hash3(i as i32, 3, 7, seed));
            let r = r_mean * (0.8 + 0.4 * h1);
            let room = (inner - r).max(0.0);
            let rho = if n == 1 {
                0.0
            } else {
                room * ((i as f64 + 0.5) / n as f64).sqrt()
            };
            let phi = i as f64 * golden
                + 0.35 * (h2 - 0.5)
                + core::f64::consts::TAU * (seed % 97) as f64 / 97.0;
            let rho = (rho * (0.92 + 0.16 * h3)).min(room);
            fascicles.push(Fascicle {
                x: rho * libm::cos(phi),
                y: rho * libm::sin(phi),
                r,
            });
        }
        // Lookup grid over [−radius, radius]².
        let r_max = fascicles.iter().map(|f| f.r).fold(0.0, f64::max);
        let cell = (2.0 * r_max).max(radius / 16.0).max(1e-3);
        let cells = (libm::ceil(2.0 * radius / cell) as usize).clamp(1, 64);
        let cell = 2.0 * radius / cells as f64;
        let mut lists: Vec<Vec<u16>> = vec![Vec::new(); cells * cells];
        for (k, f) in fascicles.iter().enumerate() {
            let reach = f.r * 1.1;
            let cx0 = (((f.x - reach + radius) / cell).floor().max(0.0)) as usize;
            let cx1 = ((((f.x + reach + radius) / cell).floor()) as usize).min(cells - 1);
            let cy0 = (((f.y - reach + radius) / cell).floor().max(0.0)) as usize;
            let cy1 = ((((f.y + reach + radius) / cell).floor()) as usize).min(cells - 1);
            for cx in cx0..=cx1 {
                for cy in cy0..=cy1 {
                    lists[cx * cells + cy].push(k as u16);
                }
            }
        }
        let mut starts = Vec::with_capacity(cells * cells + 1);
        let mut members = Vec::new();
        for l in &lists {
            starts.push(members.len() as u32);
            members.extend_from_slice(l);
        }
        starts.push(members.len() as u32);
        FascicleLayout {
            fascicles,
            inner_radius: inner,
            cell,
            cells,
            starts,
            members,
        }
    }

    /// How far inside a fascicle the cross-section point (x, y) is, in units of `edge_mm`
    /// mapped to 0..1 (1 = well inside a fascicle, 0 = connective tissue).
    #[inline]
    pub(crate) fn inside(&self, x: f64, y: f64, radius: f64, edge_mm: f64) -> f32 {
        let cx = ((x + radius) / self.cell) as isize;
        let cy = ((y + radius) / self.cell) as isize;
        if cx < 0 || cy < 0 || cx as usize >= self.cells || cy as usize >= self.cells {
            return 0.0;
        }
        let c = cx as usize * self.cells + cy as usize;
        let mut best = f64::NEG_INFINITY;
        for &k in &self.members[self.starts[c] as usize..self.starts[c + 1] as usize] {
            let f = &self.fascicles[k as usize];
            let (dx, dy) = (x - f.x, y - f.y);
            let depth = f.r - (dx * dx + dy * dy).sqrt();
            if depth > best {
                best = depth;
            }
        }
        ((best / edge_mm + 0.5).clamp(0.0, 1.0)) as f32
    }
}

/// What a structure is, for the echo.
#[derive(Debug, Clone)]
pub(crate) enum PosedKind {
    Nerve { layout: FascicleLayout, root: bool },
    Vessel { flow_cm_s: f64, wall_mm: f64 },
    Bone,
    Fluid,
}

/// A structure's geometry in the image frame.
#[derive(Debug, Clone)]
pub(crate) enum PosedShape {
    Tube {
        segments: Vec<TubeSegment>,
        radius: f64,
        /// Radius including a vessel wall (= radius otherwise).
        outer: f64,
    },
    Ellipsoid {
        centre: V3,
        /// Rows map an image offset to unit-sphere coordinates.
        m: [V3; 3],
    },
}

/// A structure posed for one frame.
#[derive(Debug, Clone)]
pub(crate) struct PosedStructure {
    pub(crate) kind: PosedKind,
    pub(crate) shape: PosedShape,
    /// Image-plane box where it can show: (u_min, u_max, v_min, v_max).
    pub(crate) bbox: [f64; 4],
    /// Painting order: fluid, vessel, nerve, bone.
    pub(crate) layer: u8,
}

/// Where the elevation line through a pixel meets a structure.
#[derive(Debug, Clone, Copy, Default)]
pub(crate) struct Hit {
    /// Share of the (intensity-weighted) elevation beam inside the outer surface, 0..1.
    pub(crate) outer: f32,
    /// Share inside the inner surface (vessel lumen); equals `outer` for other kinds.
    pub(crate) inner: f32,
    /// Offset from the axis at the strongest-beam point, image coordinates (tubes), or the
    /// outward surface normal direction (ellipsoids); not normalised.
    pub(crate) radial: V3,
    /// Segment index (tubes).
    pub(crate) segment: usize,
}

impl PosedStructure {
    /// Pose a scene structure. `reach_e` is how far from the image plane (mm) the beam can
    /// still matter (several σ of the widest elevation profile).
    pub(crate) fn new(s: &Structure, axes: &Axes, reach_e: f64) -> Option<Self> {
        let (kind, layer) = match s.kind {
            StructureKind::Nerve { fascicles, root } => {
                let r = match &s.shape {
                    Shape::Tube(t) => t.radius_mm,
                    Shape::Ellipsoid(_) => return None,
                };
                (
                    PosedKind::Nerve {
                        layout: FascicleLayout::new(r, fascicles, root, &s.id),
                        root,
                    },
                    2,
                )
            }
            StructureKind::Vessel { flow_cm_s } => {
                let r = match &s.shape {
                    Shape::Tube(t) => t.radius_mm,
                    Shape::Ellipsoid(_) => return None,
                };
                // Wall about a tenth of the radius, 0.12–0.5 mm (modelling choice).
                (
                    PosedKind::Vessel {
                        flow_cm_s,
                        wall_mm: (0.1 * r).clamp(0.12, 0.5),
                    },
                    1,
                )
            }
            StructureKind::Bone => (PosedKind::Bone, 3),
            StructureKind::Fluid => (PosedKind::Fluid, 0),
        };
        match &s.shape {
            Shape::Tube(t) => {
                let radius = t.radius_mm;
                let outer = match kind {
                    PosedKind::Vessel { wall_mm, .. } => radius + wall_mm,
                    _ => radius,
                };
                let pts: Vec<V3> = t.path_mm.iter().map(|p| axes.to_image(*p)).collect();
                let n = pts.len();
                let mut segments = Vec::with_capacity(n.saturating_sub(1));
                let mut bbox = [
                    f64::INFINITY,
                    f64::NEG_INFINITY,
                    f64::INFINITY,
                    f64::NEG_INFINITY,
                ];
                for (i, w) in pts.windows(2).enumerate() {
                    let (a, b) = (w[0], w[1]);
                    let ab = sub(b, a);
                    let len = norm(ab);
                    if len < 1e-9 {
                        continue;
                    }
                    let k = scale(ab, 1.0 / len);
                    let t_lo = if i == 0 { 0.0 } else { -outer };
                    let t_hi = if i + 2 == n { len } else { len + outer };
                    // Cross-section basis fixed to the tissue: from the world axis direction.
                    let kw = sub(t.path_mm[i + 1], t.path_mm[i]);
                    let kw = scale(kw, 1.0 / norm(kw));
                    let p1w = unit_or(cross(kw, [0.0, 0.0, 1.0]), [1.0, 0.0, 0.0]);
                    let p2w = cross(kw, p1w);
                    let p1 = axes.dir_to_image(p1w);
                    let p2 = axes.dir_to_image(p2w);
                    // Part of the axis within reach of the beam in elevation.
                    let limit = reach_e + outer;
                    let (mut lo, mut hi) = (t_lo, t_hi);
                    let ke = k[2];
                    if ke.abs() < 1e-12 {
                        if a[2].abs() > limit {
                            continue;
                        }
                    } else {
                        let ta = (-limit - a[2]) / ke;
                        let tb = (limit - a[2]) / ke;
                        lo = lo.max(ta.min(tb));
                        hi = hi.min(ta.max(tb));
                        if hi < lo {
                            continue;
                        }
                    }
                    let pa = [a[0] + k[0] * lo, a[1] + k[1] * lo];
                    let pb = [a[0] + k[0] * hi, a[1] + k[1] * hi];
                    let sb = [
                        pa[0].min(pb[0]) - outer,
                        pa[0].max(pb[0]) + outer,
                        pa[1].min(pb[1]) - outer,
                        pa[1].max(pb[1]) + outer,
                    ];
                    bbox = [
                        bbox[0].min(sb[0]),
                        bbox[1].max(sb[1]),
                        bbox[2].min(sb[2]),
                        bbox[3].max(sb[3]),
                    ];
                    segments.push(TubeSegment {
                        a,
                        k,
                        t_lo,
                        t_hi,
                        p1,
                        p2,
                        bbox: sb,
                    });
                }
                if segments.is_empty() {
                    return None;
                }
                Some(PosedStructure {
                    kind,
                    shape: PosedShape::Tube {
                        segments,
                        radius,
                        outer,
                    },
                    bbox,
                    layer,
                })
            }
            Shape::Ellipsoid(el) => {
                let (s_yaw, c_yaw) = super::math::sin_cos(super::math::rad(el.yaw_deg));
                let axes_world = [[c_yaw, s_yaw, 0.0], [-s_yaw, c_yaw, 0.0], [0.0, 0.0, 1.0]];
                let semi = el.semi_axes_mm;
                let dirs: Vec<V3> = axes_world.iter().map(|d| axes.dir_to_image(*d)).collect();
                let m = [
                    scale(dirs[0], 1.0 / semi[0]),
                    scale(dirs[1], 1.0 / semi[1]),
                    scale(dirs[2], 1.0 / semi[2]),
                ];
                let centre = axes.to_image(el.centre_mm);
                let half = |c: usize| {
                    let (x, y, z) = (
                        semi[0] * dirs[0][c],
                        semi[1] * dirs[1][c],
                        semi[2] * dirs[2][c],
                    );
                    (x * x + y * y + z * z).sqrt()
                };
                if centre[2].abs() > half(2) + reach_e {
                    return None;
                }
                let (hu, hv) = (half(0), half(1));
                Some(PosedStructure {
                    kind,
                    shape: PosedShape::Ellipsoid { centre, m },
                    bbox: [
                        centre[0] - hu,
                        centre[0] + hu,
                        centre[1] - hv,
                        centre[1] + hv,
                    ],
                    layer,
                })
            }
        }
    }

    /// How the elevation line through image point (u, v) meets the structure, with the
    /// intensity profile's σ `sigma_mm`; `None` when it misses.
    #[inline]
    pub(crate) fn hit(&self, u: f64, v: f64, sigma_mm: f64, cdf: &NormalCdf) -> Option<Hit> {
        match &self.shape {
            PosedShape::Tube {
                segments,
                radius,
                outer,
            } => {
                let mut best: Option<Hit> = None;
                for (idx, seg) in segments.iter().enumerate() {
                    if u < seg.bbox[0] || u > seg.bbox[1] || v < seg.bbox[2] || v > seg.bbox[3] {
                        continue;
                    }
                    if let Some(h) = seg.hit(u, v, *radius, *outer, sigma_mm, cdf) {
                        if best.is_none_or(|b| h.outer > b.outer) {
                            best = Some(Hit { segment: idx, ..h });
                        }
                    }
                }
                best
            }
            PosedShape::Ellipsoid { centre, m } => {
                let q = [u - centre[0], v - centre[1], -centre[2]];
                let ql = [dot(m[0], q), dot(m[1], q), dot(m[2], q)];
                let m3 = [m[0][2], m[1][2], m[2][2]];
                let a = dot(m3, m3);
                let b = dot(ql, m3);
                let c = dot(ql, ql) - 1.0;
                let disc = b * b - a * c;
                if disc <= 0.0 || a <= 0.0 {
                    return None;
                }
                let sq = disc.sqrt();
                let (e0, e1) = ((-b - sq) / a, (-b + sq) / a);
                let f = cdf.phi((e1 / sigma_mm) as f32) - cdf.phi((e0 / sigma_mm) as f32);
                if f <= 0.0 {
                    return None;
                }
                let e = 0.0f64.clamp(e0, e1);
                let qr = [ql[0] + e * m3[0], ql[1] + e * m3[1], ql[2] + e * m3[2]];
                // Outward normal ∝ Mᵀ·q_local.
                let normal = [
                    m[0][0] * qr[0] + m[1][0] * qr[1] + m[2][0] * qr[2],
                    m[0][1] * qr[0] + m[1][1] * qr[1] + m[2][1] * qr[2],
                    m[0][2] * qr[0] + m[1][2] * qr[1] + m[2][2] * qr[2],
                ];
                Some(Hit {
                    outer: f,
                    inner: f,
                    radial: normal,
                    segment: 0,
                })
            }
        }
    }

    /// Cross-section coordinates (along p1, p2) of a radial offset on segment `seg`.
    #[inline]
    pub(crate) fn section_xy(&self, seg: usize, radial: V3) -> (f64, f64) {
        match &self.shape {
            PosedShape::Tube { segments, .. } => {
                let s = &segments[seg];
                (dot(radial, s.p1), dot(radial, s.p2))
            }
            PosedShape::Ellipsoid { .. } => (0.0, 0.0),
        }
    }

    /// Unit axis of tube segment `seg` (image coordinates); zero for an ellipsoid.
    #[inline]
    pub(crate) fn axis(&self, seg: usize) -> V3 {
        match &self.shape {
            PosedShape::Tube { segments, .. } => segments[seg].k,
            PosedShape::Ellipsoid { .. } => [0.0; 3],
        }
    }

    /// Tube radius (lumen for a vessel), mm; 0 for an ellipsoid.
    pub(crate) fn radius(&self) -> f64 {
        match &self.shape {
            PosedShape::Tube { radius, .. } => *radius,
            PosedShape::Ellipsoid { .. } => 0.0,
        }
    }
}

impl TubeSegment {
    #[inline]
    fn hit(
        &self,
        u: f64,
        v: f64,
        radius: f64,
        outer: f64,
        sigma: f64,
        cdf: &NormalCdf,
    ) -> Option<Hit> {
        let k = self.k;
        let q = [u - self.a[0], v - self.a[1], -self.a[2]];
        let qk = dot(q, k);
        let qp = [q[0] - qk * k[0], q[1] - qk * k[1], q[2] - qk * k[2]];
        let ke = k[2];
        let np = [-ke * k[0], -ke * k[1], 1.0 - ke * k[2]];
        let a = 1.0 - ke * ke;
        let b = qp[2];
        let c0 = dot(qp, qp);
        // Axial clip as an e-interval.
        let (clip_lo, clip_hi) = if ke.abs() > 1e-12 {
            let x = (self.t_lo - qk) / ke;
            let y = (self.t_hi - qk) / ke;
            (min_f64(x, y), max_f64(x, y))
        } else if qk >= self.t_lo && qk <= self.t_hi {
            (f64::NEG_INFINITY, f64::INFINITY)
        } else {
            return None;
        };
        let interval = |r: f64| -> Option<(f64, f64)> {
            let c = c0 - r * r;
            let (e0, e1) = if a < 1e-10 {
                if c > 0.0 {
                    return None;
                }
                (f64::NEG_INFINITY, f64::INFINITY)
            } else {
                let disc = b * b - a * c;
                if disc <= 0.0 {
                    return None;
                }
                let sq = disc.sqrt();
                ((-b - sq) / a, (-b + sq) / a)
            };
            let (e0, e1) = (max_f64(e0, clip_lo), min_f64(e1, clip_hi));
            (e1 > e0).then_some((e0, e1))
        };
        let (o0, o1) = interval(outer)?;
        let share = |e0: f64, e1: f64| cdf.phi((e1 / sigma) as f32) - cdf.phi((e0 / sigma) as f32);
        let f_outer = share(o0, o1);
        if f_outer <= 0.0 {
            return None;
        }
        let (f_inner, e_rep) = if outer > radius {
            match interval(radius) {
                Some((i0, i1)) => (share(i0, i1), 0.0f64.clamp(i0, i1)),
                None => (0.0, 0.0f64.clamp(o0, o1)),
            }
        } else {
            (f_outer, 0.0f64.clamp(o0, o1))
        };
        Some(Hit {
            outer: f_outer,
            inner: f_inner,
            radial: [
                qp[0] + e_rep * np[0],
                qp[1] + e_rep * np[1],
                qp[2] + e_rep * np[2],
            ],
            segment: 0,
        })
    }
}
