//! Equipment, one module per kind. Each module owns everything about its kind: the
//! parameters read from the flowsheet, its keys, its ports, how it joins its
//! streams, its static pressure rule, its model and the details it reports (see
//! [`kind`] for the traits). The kinds are registered once, below; adding one is a
//! new module plus one registration line (docs/architecture.md shows how). None of
//! the models parses files or prints.

pub mod kind;
pub mod pinch;

pub use kind::{
    Coupling, Equipment, EquipmentKind, FeedFlow, Ports, PressureConflict, ProductRole, Reader,
    Reading, Role, WrittenInlet,
};

use crate::error::FlowsheetError;
use crate::fluids::State;

/// Registers the kinds: declares each module and makes [`UnitSpec`] (one variant per
/// kind, wrapping the kind's parameters), its dispatch to [`Equipment`], and the
/// table of kinds the reader looks names up in.
macro_rules! register_kinds {
    ($($variant:ident($module:ident::$parameters:ident)),* $(,)?) => {
        $(pub mod $module;)*

        /// Equipment parameters in SI units: one variant per kind, wrapping that
        /// kind's parameters. It dereferences to the kind's [`Equipment`] behaviour.
        #[derive(Debug, Clone)]
        pub enum UnitSpec {
            $(
                #[doc = concat!("A `", stringify!($module), "` unit.")]
                $variant($module::$parameters),
            )*
        }

        impl UnitSpec {
            /// The kind's name as written in files.
            pub fn kind(&self) -> &'static str {
                match self {
                    $(UnitSpec::$variant(_) => <$module::$parameters as EquipmentKind>::NAME,)*
                }
            }

            /// The kind's behaviour.
            pub fn equipment(&self) -> &(dyn Equipment + 'static) {
                match self {
                    $(UnitSpec::$variant(parameters) => parameters,)*
                }
            }

            /// The kind's behaviour, to change (connecting an optional outlet).
            pub fn equipment_mut(&mut self) -> &mut (dyn Equipment + 'static) {
                match self {
                    $(UnitSpec::$variant(parameters) => parameters,)*
                }
            }
        }

        /// Every registered kind, in registration order.
        pub const KINDS: &[KindEntry] = &[
            $(KindEntry {
                name: <$module::$parameters as EquipmentKind>::NAME,
                keys: <$module::$parameters as EquipmentKind>::KEYS,
                alternative_keys: <$module::$parameters as EquipmentKind>::ALTERNATIVE_KEYS,
                read: |reader| {
                    <$module::$parameters as EquipmentKind>::read(reader).map(UnitSpec::$variant)
                },
            },)*
        ];
    };
}

register_kinds! {
    Feed(feed::Feed),
    Product(product::Product),
    Compressor(compressor::Compressor),
    Cooler(cooler::Cooler),
    Exchanger(exchanger::Exchanger),
    MultistreamExchanger(multistream::MultistreamExchanger),
    Precooler(precooler::Precooler),
    Valve(valve::Valve),
    Separator(separator::Separator),
    Mixer(mixer::Mixer),
    Splitter(splitter::Splitter),
    Expander(expander::Expander),
    TransferLine(transfer_line::TransferLine),
    Converter(converter::Converter),
}

/// One registered kind: its name, its keys and its reader.
#[derive(Clone, Copy)]
pub struct KindEntry {
    /// The name written in files.
    pub name: &'static str,
    /// Its keys besides `id` and `kind`.
    pub keys: &'static [&'static str],
    /// Keys of which one is given; an override of one replaces the others.
    pub alternative_keys: &'static [&'static str],
    /// Reads an item of this kind.
    pub read: fn(&mut Reader) -> Result<UnitSpec, FlowsheetError>,
}

impl std::fmt::Debug for KindEntry {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("KindEntry")
            .field("name", &self.name)
            .finish()
    }
}

/// The registered kind called `name`.
pub fn kind_named(name: &str) -> Option<&'static KindEntry> {
    KINDS.iter().find(|k| k.name == name)
}

/// The registered kinds' names in words: `feed, product, … and expander`.
pub fn kind_names() -> String {
    let names: Vec<&str> = KINDS.iter().map(|k| k.name).collect();
    match names.split_last() {
        Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
        _ => names.join(""),
    }
}

impl std::ops::Deref for UnitSpec {
    type Target = dyn Equipment;
    fn deref(&self) -> &(dyn Equipment + 'static) {
        self.equipment()
    }
}

/// A stream's state and mass flow.
#[derive(Debug, Clone)]
pub struct Flow {
    /// Thermodynamic state.
    pub state: State,
    /// Mass flow, kg/s.
    pub flow: f64,
}

/// What the solver passes every model.
#[derive(Debug, Clone, Copy)]
pub struct Context {
    /// Ambient (dead-state) temperature, K.
    pub ambient: f64,
    /// Work out everything reported (exchanger profiles, conductance, largest duty),
    /// not only what the outlets need; the solver asks for it on its final pass.
    pub detailed: bool,
    /// On the detailed pass, work out each two-stream exchanger's largest duty and
    /// effectiveness (else NaN); off only for re-solves that read neither.
    pub largest_duty: bool,
    /// The flow the solver gives a feed, kg/s (fixed, or the make-up iterate).
    pub feed_flow: f64,
    /// The unit's duty on the previous pass, W, which exchangers solved for their
    /// duty start from.
    pub duty_hint: Option<f64>,
    /// The temperatures of the unit's first two outlets on the previous pass, K,
    /// where a flash of an outlet may start its search (it ends at the same state
    /// to the flash's tolerance from any start).
    pub outlet_hints: [Option<f64>; 2],
    /// The tear streams are still far from converged: an exchanger sized by its
    /// pinch may stop at its coarse profile's answer (which differs from the full
    /// profile's by far less than the tear streams still move). Never on the
    /// final passes or the detailed one.
    pub loose: bool,
    /// Where an exchanger sized by its pinch found it on the previous passes.
    /// On the detailed pass [`PinchHint::Check`], or [`PinchHint::Whole`] where the
    /// pinch lay strictly inside (whole profiles throughout): the solver checks the
    /// converged point with every pinch found afresh.
    pub pinch_hint: PinchHint,
    /// Where the pinch lay on the pass before (fraction of the duty from the warm
    /// end), given with [`PinchHint::Inside`] only: a multistream exchanger then
    /// draws its composite curves only around there.
    pub pinch_position: Option<f64>,
}

/// Where an exchanger sized by its pinch found it lately, and so where a pass may
/// look for it first: the hint saves profiles, and the solver's detailed pass
/// finds every pinch afresh to check the converged point.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PinchHint {
    /// No hint: try the ends, confirmed on a profile, then search inside.
    #[default]
    Check,
    /// At an end on the pass before: once the tear streams settle, take that end's
    /// duty from the end flash alone.
    End,
    /// Inside, lately: search for it, without trying the ends first.
    Inside,
    /// Inside for several passes: search for it on whole profiles, without trying
    /// the ends first (a whole profile shows a pinch that has moved to an end too).
    Whole,
}

impl Context {
    /// A context at `ambient` K for a quick pass: no details, no feed flow, no hint.
    pub fn new(ambient: f64) -> Context {
        Context {
            ambient,
            detailed: false,
            largest_duty: true,
            feed_flow: 0.0,
            duty_hint: None,
            outlet_hints: [None; 2],
            loose: false,
            pinch_hint: PinchHint::Check,
            pinch_position: None,
        }
    }
}

/// Kind-specific results.
#[derive(Debug, Clone, Default)]
pub enum Details {
    /// Nothing beyond the common figures.
    #[default]
    None,
    /// Compressor: discharge temperature of each stage, K.
    Compressor {
        /// Per stage.
        discharge_temperatures: Vec<f64>,
    },
    /// Exchanger: conductance, effectiveness, the smallest temperature difference and
    /// where it occurs, and the profile.
    Exchanger(Box<exchanger::ExchangerReport>),
    /// Precooler: bath temperature and boil-off, or refrigerator figures.
    Precooler {
        /// Bath (or coolant inlet) temperature, K.
        sink_temperature: f64,
        /// Cryogen evaporated, kg/s (bath only).
        boil_off: Option<f64>,
    },
    /// Expander: the liquid mass fraction at the outlet.
    Expander {
        /// Liquid fraction.
        outlet_liquid_fraction: f64,
    },
}

/// What one unit did.
#[derive(Debug, Clone, Default)]
pub struct Performance {
    /// Shaft power into the unit, W (negative: recovered from it).
    pub work_in: f64,
    /// Heat exchanged with reservoirs outside the streams: (heat into the plant W,
    /// reservoir temperature K). Ambient coolers reject at the ambient temperature.
    pub heat_in: Vec<(f64, f64)>,
    /// Heat transferred, W (cooler, precooler, exchanger).
    pub duty: Option<f64>,
    /// The work equivalent of precooling, W (cryogen or refrigerator).
    pub precooling_work: f64,
    /// Exergy destroyed outside the streams' own entropy balance, W (the
    /// refrigerator's internal losses).
    pub extra_destroyed: f64,
    /// Kind-specific figures.
    pub details: Details,
    /// Matter entering the plant through the unit that is no stream of the
    /// flowsheet: the liquid cryogen fed to a bath whose boil-off is routed on as a
    /// stream (its mass, enthalpy and entropy enter the balances).
    pub utility_in: Option<Flow>,
    /// Where an exchanger sized by its pinch found it: at an end (`Some(true)`) or
    /// inside (`Some(false)`); see [`Context::pinch_hint`].
    pub pinch_at_end: Option<bool>,
    /// Where a pinch searched for inside lay (fraction of the duty from the warm
    /// end), where the exchanger reports it; see [`Context::pinch_position`].
    pub pinch_position: Option<f64>,
}
