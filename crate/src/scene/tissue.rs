//! Horizontal tissue layers under the skin.

/// Tissue type of a layer; it sets echo texture and attenuation.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LayerKind {
    /// Epidermis and dermis.
    Skin,
    /// Subcutaneous fat.
    Fat,
    /// Skeletal muscle.
    Muscle,
    /// Dense connective tissue sheet.
    Fascia,
    /// Aerated lung below the pleura: the layer above meets air, a near-total reflector.
    Lung,
}

impl LayerKind {
    /// All kinds, in the order the file format lists them.
    pub const ALL: [LayerKind; 5] = [
        LayerKind::Skin,
        LayerKind::Fat,
        LayerKind::Muscle,
        LayerKind::Fascia,
        LayerKind::Lung,
    ];

    /// The word used in files.
    pub fn name(&self) -> &'static str {
        match self {
            LayerKind::Skin => "skin",
            LayerKind::Fat => "fat",
            LayerKind::Muscle => "muscle",
            LayerKind::Fascia => "fascia",
            LayerKind::Lung => "lung",
        }
    }
}

/// One layer of given thickness.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TissueLayer {
    /// Tissue type.
    pub kind: LayerKind,
    /// Thickness, mm.
    pub thickness_mm: f64,
}

/// Layers from the skin down; below the last layer its tissue continues.
#[derive(Debug, Clone, PartialEq)]
pub struct TissueLayers {
    /// Layers, top to bottom.
    pub layers: Vec<TissueLayer>,
}

impl Default for TissueLayers {
    /// 1.5 mm skin, 5 mm fat, then muscle.
    fn default() -> Self {
        TissueLayers {
            layers: vec![
                TissueLayer {
                    kind: LayerKind::Skin,
                    thickness_mm: 1.5,
                },
                TissueLayer {
                    kind: LayerKind::Fat,
                    thickness_mm: 5.0,
                },
                TissueLayer {
                    kind: LayerKind::Muscle,
                    thickness_mm: 30.0,
                },
            ],
        }
    }
}

impl TissueLayers {
    /// Tissue at world depth z ≥ 0 (the last layer continues below).
    pub fn kind_at(&self, z_mm: f64) -> LayerKind {
        let mut top = 0.0;
        for l in &self.layers {
            top += l.thickness_mm;
            if z_mm < top {
                return l.kind;
            }
        }
        self.layers.last().map_or(LayerKind::Muscle, |l| l.kind)
    }

    /// Depths of the boundaries between layers (not the skin surface), mm.
    pub fn boundaries_mm(&self) -> Vec<f64> {
        let mut out = Vec::with_capacity(self.layers.len());
        let mut top = 0.0;
        for l in self.layers.iter().take(self.layers.len().saturating_sub(1)) {
            top += l.thickness_mm;
            out.push(top);
        }
        out
    }
}
