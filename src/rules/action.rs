//! Suggested actions and warnings: what to do now, how much, and why; and
//! what not to do.

use serde::Serialize;

/// What kind of action; the order of the variants is the order actions are
/// shown in (most urgent first).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ActionKind {
    /// Take dead fish out now.
    RemoveDead,
    /// Call an aquatic veterinarian.
    CallVeterinarian,
    /// Move fish showing signs to a separate tank.
    Isolate,
    /// Partial water change(s).
    WaterChange,
    /// Stop feeding.
    HoldFeeding,
    /// More air, break the surface.
    Aerate,
    /// Dose an ammonia binder as a stop-gap.
    AmmoniaBinder,
    /// Zeolite in the filter (fresh water without salt only).
    Zeolite,
    /// Raise chloride against nitrite.
    AddChloride,
    /// Check the filter: flow, clogging, recent disturbance.
    CheckBiofilter,
    /// Add a nitrifying culture.
    NitrifyingCulture,
    /// Lower the heater within the species' range.
    LowerTemperature,
    /// Add salt, for species that tolerate it.
    AddSalt,
    /// Feeding may start again.
    ResumeFeeding,
    /// Test again.
    Retest,
}

impl ActionKind {
    /// Kebab-case name, as in JSON.
    pub fn name(self) -> &'static str {
        match self {
            ActionKind::RemoveDead => "remove-dead",
            ActionKind::CallVeterinarian => "call-veterinarian",
            ActionKind::Isolate => "isolate",
            ActionKind::WaterChange => "water-change",
            ActionKind::HoldFeeding => "hold-feeding",
            ActionKind::Aerate => "aerate",
            ActionKind::AmmoniaBinder => "ammonia-binder",
            ActionKind::Zeolite => "zeolite",
            ActionKind::AddChloride => "add-chloride",
            ActionKind::CheckBiofilter => "check-biofilter",
            ActionKind::NitrifyingCulture => "nitrifying-culture",
            ActionKind::LowerTemperature => "lower-temperature",
            ActionKind::AddSalt => "add-salt",
            ActionKind::ResumeFeeding => "resume-feeding",
            ActionKind::Retest => "retest",
        }
    }

    /// A short imperative title for screens and reports.
    pub fn title(self) -> &'static str {
        match self {
            ActionKind::RemoveDead => "Remove dead fish",
            ActionKind::CallVeterinarian => "Call an aquatic vet",
            ActionKind::Isolate => "Isolate sick fish",
            ActionKind::WaterChange => "Water change",
            ActionKind::HoldFeeding => "Hold feeding",
            ActionKind::Aerate => "Aerate",
            ActionKind::AmmoniaBinder => "Ammonia binder",
            ActionKind::Zeolite => "Zeolite",
            ActionKind::AddChloride => "Add chloride",
            ActionKind::CheckBiofilter => "Check the biofilter",
            ActionKind::NitrifyingCulture => "Nitrifying culture",
            ActionKind::LowerTemperature => "Lower temperature",
            ActionKind::AddSalt => "Add salt",
            ActionKind::ResumeFeeding => "Resume feeding",
            ActionKind::Retest => "Retest",
        }
    }
}

/// One suggested action.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Action {
    /// What to do.
    pub kind: ActionKind,
    /// How much, in `unit`; `None` when it is not a quantity.
    pub quantity: Option<f64>,
    /// The unit of `quantity` (`%`, `L`, `g`, `°C`, `h`...).
    pub unit: Option<&'static str>,
    /// A second quantity where one is not enough (litres beside a percent).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub also: Option<Quantity>,
    /// How many times to repeat it (a sequence of water changes), when more than once.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub repeat: Option<u32>,
    /// Why, and what it achieves, in words a person can check.
    pub reason: String,
}

/// A quantity with its unit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Quantity {
    /// The amount.
    pub quantity: f64,
    /// Its unit.
    pub unit: &'static str,
}

impl Action {
    /// An action without a quantity.
    pub fn plain(kind: ActionKind, reason: impl Into<String>) -> Action {
        Action { kind, quantity: None, unit: None, also: None, repeat: None, reason: reason.into() }
    }

    /// An action with a quantity.
    pub fn amount(kind: ActionKind, quantity: f64, unit: &'static str, reason: impl Into<String>) -> Action {
        Action { kind, quantity: Some(quantity), unit: Some(unit), also: None, repeat: None, reason: reason.into() }
    }

    /// The same action with a second quantity.
    pub fn and_also(mut self, quantity: f64, unit: &'static str) -> Action {
        self.also = Some(Quantity { quantity, unit });
        self
    }
}

/// What not to do, and why.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum WarningKind {
    /// Anything that raises pH now turns ammonium into NH3.
    DoNotRaisePh,
    /// The source water carries ammonia of its own.
    SourceWaterAmmonia,
    /// Leave the filter media alone while ammonia is high.
    DoNotCleanFilter,
    /// Salt releases ammonia bound by zeolite.
    NoSaltWithZeolite,
    /// Zeolite does not work in salt water.
    NoZeoliteInSaltWater,
    /// Dilution with this source water cannot bring NH3 down.
    SourceCannotDilute,
    /// The measured temperature is outside the species' range.
    TemperatureOutsideRange,
    /// The measured pH is outside the species' range.
    PhOutsideRange,
    /// A dose would need more salt than the species tolerate.
    SaltBeyondTolerance,
    /// The source water's temperature would chill or heat the tank.
    TemperatureShock,
}

/// A warning shown beside the actions.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Warning {
    /// What kind.
    pub kind: WarningKind,
    /// The warning, in words.
    pub message: String,
}
