//! The family registry: one entry per test family, holding everything that
//! is said about a family outside its mathematics: its id and plain names,
//! the named test and approximation, the design fields it takes (label,
//! unit, range, the rule and its message), the summary-data fields, the
//! data-file roles and the smallest n.
//!
//! The JSON parser (`request`), the design's validation (`design`), the
//! decision input, the page's form, the data-file mapping and the README's
//! field table all read it. Adding a family means one [`Entry`] here, its
//! model (`model`, `decision`) and its tests.
//!
//! Architecture invariant: the registry is data. No statistics here, and no
//! other module spells a family's fields, labels or roles again.

use serde::Serialize;

/// The test families (DEVELOPERS.md, "Families").
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Family {
    /// One mean, σ known: z statistic.
    MeanZ,
    /// One mean, σ unknown: one-sample t.
    MeanT,
    /// Paired means: one-sample t on the differences.
    PairedT,
    /// Two means, equal variances: pooled t.
    TwoMeansPooled,
    /// Two means, unequal variances: Welch t.
    TwoMeansWelch,
    /// One proportion, exact binomial.
    ProportionExact,
    /// One proportion, normal approximation.
    ProportionNormal,
    /// Two proportions, normal approximation with pooled SE under H0.
    TwoProportions,
    /// Two learners over cross-validation splits: corrected resampled t.
    TwoLearnersCv,
    /// Two classifiers on the same test items: exact conditional test on
    /// the discordant items, planned over their number.
    TwoClassifiers,
}

/// How a field's text is read on the page (the JSON contract takes numbers).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Input {
    /// Any number, such as 6.5 or −3.
    Number,
    /// A probability or rate: "0.05" or "5%".
    Rate,
    /// A whole number (sample sizes, counts).
    Whole,
}

/// The rule a design value must meet; the message's rule text comes from
/// [`Check::rule`], so every place that states it says the same.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Check {
    /// Any finite number.
    Finite,
    /// A finite number > 0.
    Positive,
    /// Strictly between 0 and 1.
    OpenUnit,
    /// An error-rate limit: strictly between 0 and 0.5.
    Limit,
    /// An allocation ratio n2/n1: above 0, at most 100.
    Ratio,
    /// A whole number; its range is the design's (`n`) or the data's.
    Whole,
    /// A dropout share: from 0 to [`DROPOUT_MAX`].
    Dropout,
    /// A cost weight: from [`WEIGHT_MIN`] to 1 − [`WEIGHT_MIN`].
    Weight,
    /// The folds of k-fold cross-validation: a whole number from 2 to [`FOLDS_MAX`].
    Folds,
    /// Test items per training item in each split: above 0, at most 100.
    TestShare,
    /// A share that may be 1 but not 0: above 0, at most 1.
    PositiveShare,
}

/// The most folds taken (leave-one-out on a hundred thousand items).
pub const FOLDS_MAX: f64 = 100_000.0;

/// The smallest cost weight taken (and 1 − it the largest): a false alarm
/// weighing a millionth of a miss, or a million times as much. Past it the
/// weighted error falls below the arithmetic's rounding and every rule
/// ties with every other, which no plan means.
pub const WEIGHT_MIN: f64 = 1e-6;

/// The largest dropout share taken: above it the number to enrol is more
/// than twenty times the sample size, which is no plan.
pub const DROPOUT_MAX: f64 = 0.95;

impl Check {
    /// The rule in words, as messages state it.
    pub fn rule(self) -> &'static str {
        match self {
            Check::Finite => "a finite number",
            Check::Positive => "a finite number > 0",
            Check::OpenUnit => "between 0 and 1 (exclusive)",
            Check::Limit => "between 0 and 0.5 (exclusive)",
            Check::Ratio => "between 0 and 100 (n2 = ratio·n1)",
            Check::Whole => "a whole number",
            Check::Dropout => "a share from 0 to 0.95 (0.15 or 15% for 15 in 100 lost)",
            Check::Weight => "between 0.000001 and 0.999999 (a false alarm weighing from a millionth to a million times a miss)",
            Check::Folds => "a whole number from 2 to 100000 (10 for 10-fold cross-validation)",
            Check::TestShare => "above 0 and at most 100 (test items per training item in each split: 0.25 for an 80/20 split)",
            Check::PositiveShare => "a share above 0 and at most 1 (0.15 or 15%)",
        }
    }

    /// Does `v` meet the rule? (`Whole` checks only wholeness; ranges of
    /// counts depend on the design and are checked where they are known.)
    pub fn holds(self, v: f64) -> bool {
        match self {
            Check::Finite => v.is_finite(),
            Check::Positive => v.is_finite() && v > 0.0,
            Check::OpenUnit => v > 0.0 && v < 1.0,
            Check::Limit => v > 0.0 && v < 0.5,
            Check::Ratio => v.is_finite() && v > 0.0 && v <= 100.0,
            Check::Whole => v.is_finite() && v.fract() == 0.0,
            Check::Dropout => (0.0..=DROPOUT_MAX).contains(&v),
            Check::Weight => (WEIGHT_MIN..=1.0 - WEIGHT_MIN).contains(&v),
            Check::Folds => v.fract() == 0.0 && (2.0..=FOLDS_MAX).contains(&v),
            Check::TestShare => v > 0.0 && v <= 100.0,
            Check::PositiveShare => v > 0.0 && v <= 1.0,
        }
    }
}

/// One field of a design or of summary data.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Field {
    /// The JSON name (summary fields without their `data.` prefix).
    pub key: &'static str,
    /// The page's input for it (`f-INPUT`); differs from `key` only where a
    /// family shows the engine's field under a name of its own (a
    /// proportion's θ0 is the page's `p0`).
    pub input: &'static str,
    /// The label on the page; `{u}` is replaced by " (unit)" or nothing.
    pub label: &'static str,
    /// What is missing, in words, for the page's "still needed" list.
    pub needed: &'static str,
    /// What to give, for the `Missing` error of the JSON contract.
    pub hint: &'static str,
    pub read: Input,
    pub check: Check,
    pub required: bool,
}

/// The shape of the data a family decides from, and so the roles a data
/// file's columns play.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Shape {
    /// One column of measurements.
    One,
    /// Two columns measured on the same units; the differences are first − second.
    Paired,
    /// A measurement column and a group column with two levels.
    TwoGroups,
    /// An outcome column and the level that counts as a success.
    Binary,
    /// An outcome column, its success level, and a group column with two levels.
    TwoGroupsBinary,
    /// Two right/wrong columns on the same items (two classifiers, or one
    /// group asked yes/no twice), or two prediction columns and the truth.
    PairedBinary,
}

/// A role a data file's column (or one of its levels) plays.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Role {
    Value,
    First,
    Second,
    Group,
    Level1,
    Level2,
    Outcome,
    Success,
    /// Classifier 1's column: right/wrong on each item, or its predictions.
    Classifier1,
    Classifier2,
    /// The true label, when the classifiers' columns hold predictions
    /// (optional: [`NO_TRUTH`] when they say right or wrong).
    Truth,
}

/// The [`Role::Truth`] choice that says the classifiers' columns hold right
/// or wrong themselves.
pub const NO_TRUTH: &str = "";

impl Role {
    pub const ALL: [Role; 11] = [
        Role::Value,
        Role::First,
        Role::Second,
        Role::Group,
        Role::Level1,
        Role::Level2,
        Role::Outcome,
        Role::Success,
        Role::Classifier1,
        Role::Classifier2,
        Role::Truth,
    ];

    /// The role's name: the page's radio group (`dm-KEY`) and the command
    /// line's mapping field.
    pub fn key(self) -> &'static str {
        match self {
            Role::Value => "value",
            Role::First => "first",
            Role::Second => "second",
            Role::Group => "group",
            Role::Level1 => "level1",
            Role::Level2 => "level2",
            Role::Outcome => "outcome",
            Role::Success => "success",
            Role::Classifier1 => "classifier1",
            Role::Classifier2 => "classifier2",
            Role::Truth => "truth",
        }
    }

    pub fn from_key(k: &str) -> Option<Role> {
        Role::ALL.into_iter().find(|r| r.key() == k)
    }

    /// The plain question the page asks for it.
    pub fn question(self) -> &'static str {
        match self {
            Role::Value => "Which column holds the measurements?",
            Role::First => "First measurement of each pair (the difference is first − second)",
            Role::Second => "Second measurement of each pair",
            Role::Group => "Which column says the group?",
            Role::Level1 => "Group 1 is",
            Role::Level2 => "Group 2 is",
            Role::Outcome => "Which column holds the outcome?",
            Role::Success => "Which value counts as a success?",
            Role::Classifier1 => "Classifier 1: which column says whether it was right (or holds its predictions)?",
            Role::Classifier2 => "Classifier 2: which column says whether it was right (or holds its predictions)?",
            Role::Truth => "Do those columns hold predictions? Then which column holds the true label?",
        }
    }

    /// A column's name (true) or one of a column's levels (false).
    pub fn is_column(self) -> bool {
        !matches!(self, Role::Level1 | Role::Level2 | Role::Success)
    }
}

impl Shape {
    /// The roles of a shape, in the order the page asks them.
    pub fn roles(self) -> &'static [Role] {
        match self {
            Shape::One => &[Role::Value],
            Shape::Paired => &[Role::First, Role::Second],
            Shape::TwoGroups => &[Role::Value, Role::Group, Role::Level1, Role::Level2],
            Shape::Binary => &[Role::Outcome, Role::Success],
            Shape::TwoGroupsBinary => &[Role::Outcome, Role::Success, Role::Group, Role::Level1, Role::Level2],
            Shape::PairedBinary => &[Role::Classifier1, Role::Classifier2, Role::Truth],
        }
    }

    /// Yes/no outcomes rather than measurements.
    pub fn binary(self) -> bool {
        matches!(self, Shape::Binary | Shape::TwoGroupsBinary | Shape::PairedBinary)
    }
}

/// Which group of the page's chooser a family stands in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    Means,
    Proportions,
    Models,
}

impl Kind {
    pub const ALL: [Kind; 3] = [Kind::Means, Kind::Proportions, Kind::Models];

    pub fn title(self) -> &'static str {
        match self {
            Kind::Means => "Means",
            Kind::Proportions => "Proportions",
            Kind::Models => "Models",
        }
    }
}

/// Everything said about one family.
#[derive(Debug, Clone, Copy)]
pub struct Entry {
    pub family: Family,
    /// The identifier in JSON input and output.
    pub id: &'static str,
    /// A plain description for messages and reports.
    pub title: &'static str,
    /// The named test, as a methods section writes it.
    pub test: &'static str,
    /// The approximation the test rests on, named (None: exact given the model).
    pub approximation: Option<&'static str>,
    /// The page's chooser: its group, its words and their explanation.
    pub kind: Kind,
    pub chip: &'static str,
    pub chip_note: &'static str,
    /// The design fields, in the order the page shows them.
    pub design: &'static [Field],
    /// The effect may be given standardised instead (`d`: θ0 = 0, σ = 1, θ1 = d).
    pub standardised: bool,
    /// Two groups (then `ratio` and n2 = ⌈ratio·n1⌉ apply).
    pub two_groups: bool,
    /// The statistic is a count (saw-tooth sample sizes).
    pub discrete: bool,
    /// Smallest n (per group) for which the statistic is defined.
    pub n_min: u64,
    /// The summary-data fields (JSON `data.KEY`, page `f-data-KEY`).
    pub data: &'static [Field],
    /// The data-file shape, hence the columns' roles.
    pub shape: Shape,
    /// What the estimate is, in words ("the sample mean").
    pub estimate: &'static str,
    /// The charts' axis of the statistic, in words ("sample mean").
    pub axis: &'static str,
    /// H0 in words where it is not "θ0 = value" (two proportions: equal rates).
    pub null_words: Option<&'static str>,
    /// The parameter θ the hypotheses are about, as a report writes it:
    /// "μ1 − μ2" in "H0: μ1 − μ2 = 0".
    pub parameter: &'static str,
    /// The estimate is in the user's unit (false: a proportion).
    pub in_unit: bool,
    /// Count statistics: what X counts and how its estimate reads, for the
    /// rule in words ("at least 7 successes (a proportion of 0.7 or
    /// more)"). None for continuous statistics.
    pub counted: Option<(&'static str, &'static str)>,
}

const fn field(key: &'static str, label: &'static str, needed: &'static str, read: Input, check: Check) -> Field {
    Field { key, input: key, label, needed, hint: needed, read, check, required: true }
}

const fn hinted(hint: &'static str, f: Field) -> Field {
    Field { hint, ..f }
}

const fn optional(f: Field) -> Field {
    Field { required: false, ..f }
}

const fn shown_as(input: &'static str, f: Field) -> Field {
    Field { input, ..f }
}

/// Fields every design has, in the order the page shows them.
pub const LIMITS: [Field; 3] = [
    hinted(
        "choose the largest type I error rate (false alarm) the context can accept, between 0 and 0.5",
        field("alpha_max", "Largest false-alarm rate you accept, α limit", "the largest false-alarm rate you accept (α limit)", Input::Rate, Check::Limit),
    ),
    hinted(
        "choose the largest type II error rate (missed effect) the context can accept, between 0 and 0.5",
        field("beta_max", "Largest miss rate you accept, β limit", "the largest miss rate you accept (β limit)", Input::Rate, Check::Limit),
    ),
    optional(field("weight", "Cost weight w", "the cost weight w", Input::Rate, Check::Weight)),
];

/// The sample size to check (per group for two groups).
pub const SIZE: Field = optional(field("n", "Sample size you already have", "a sample size", Input::Whole, Check::Whole));

/// The confidence level of the decision's interval, when the analyst
/// wants another than the one that follows α_max (1 − 2·α_max one-sided,
/// 1 − α_max two-sided; `interval::default_level`).
pub const INTERVAL_LEVEL: Field = optional(field(
    "interval_level",
    "Confidence level of the interval",
    "the confidence level of the interval",
    Input::Rate,
    Check::OpenUnit,
));

/// The expected share of participants lost before the end: the number to
/// enrol is ⌈n / (1 − dropout)⌉ per group (`context::enrolment`).
pub const DROPOUT: Field = optional(field(
    "dropout",
    "Expected dropout, the share lost before the end (e.g. 15%)",
    "the expected dropout share",
    Input::Rate,
    Check::Dropout,
));

/// The standardised effect, accepted instead of θ0, θ1 and σ where a
/// family allows it.
pub const STANDARDISED: Field = field("d", "Standardised effect d", "the standardised effect d", Input::Number, Check::Finite);

const RATIO: Field = optional(field(
    "ratio",
    "Size of group 2 for each person in group 1 (1 = equal groups)",
    "the allocation ratio n2/n1",
    Input::Number,
    Check::Ratio,
));

const ONE_MEAN: [Field; 3] = [
    field("theta0", "Mean if nothing has changed, θ0{u}", "the mean under H0 (θ0)", Input::Number, Check::Finite),
    field(
        "theta1",
        "Smallest change worth finding, as the mean θ1{u}",
        "the smallest effect worth finding, as the mean under the alternative (θ1)",
        Input::Number,
        Check::Finite,
    ),
    field("sigma", "Expected standard deviation of one measurement, σ{u}", "the planning standard deviation (σ)", Input::Number, Check::Positive),
];

const KNOWN_MEAN: [Field; 3] = [
    ONE_MEAN[0],
    ONE_MEAN[1],
    field("sigma", "Known standard deviation of one measurement, σ{u}", "the known standard deviation (σ)", Input::Number, Check::Positive),
];

const PAIRED: [Field; 3] = [
    field("theta0", "Mean difference if nothing has changed, θ0{u}", "the mean difference under H0 (θ0)", Input::Number, Check::Finite),
    field("theta1", "Smallest mean difference worth finding, θ1{u}", "the smallest mean difference worth finding (θ1)", Input::Number, Check::Finite),
    field(
        "sigma",
        "Expected standard deviation of the differences, σ{u}",
        "the planning standard deviation of the differences (σ)",
        Input::Number,
        Check::Positive,
    ),
];

const TWO_THETAS: [Field; 2] = [
    field(
        "theta0",
        "Difference (group 1 − group 2) if nothing has changed, θ0{u}",
        "the difference of means under H0 (θ0)",
        Input::Number,
        Check::Finite,
    ),
    field("theta1", "Smallest difference worth finding, θ1{u}", "the smallest difference worth finding (θ1)", Input::Number, Check::Finite),
];

const POOLED: [Field; 4] = [
    TWO_THETAS[0],
    TWO_THETAS[1],
    field("sigma", "Expected standard deviation within each group, σ{u}", "the planning standard deviation within each group (σ)", Input::Number, Check::Positive),
    RATIO,
];

const WELCH: [Field; 5] = [
    TWO_THETAS[0],
    TWO_THETAS[1],
    field("sigma1", "Expected standard deviation in group 1, σ1{u}", "the planning standard deviation of group 1 (σ1)", Input::Number, Check::Positive),
    field("sigma2", "Expected standard deviation in group 2, σ2{u}", "the planning standard deviation of group 2 (σ2)", Input::Number, Check::Positive),
    RATIO,
];

const ONE_PROPORTION: [Field; 2] = [
    shown_as(
        "p0",
        field("theta0", "Proportion if nothing has changed, p0 (e.g. 0.75 or 75%)", "the proportion under H0 (p0)", Input::Rate, Check::OpenUnit),
    ),
    shown_as(
        "p_alt",
        field(
            "theta1",
            "Smallest proportion worth finding, p1",
            "the smallest proportion worth finding, under the alternative (p1)",
            Input::Rate,
            Check::OpenUnit,
        ),
    ),
];

const LEARNERS: [Field; 5] = [
    field(
        "theta0",
        "Score difference if the learners are equal, θ0{u}",
        "the score difference under H0 (θ0), usually 0",
        Input::Number,
        Check::Finite,
    ),
    field(
        "theta1",
        "Smallest score difference worth finding, θ1 (learner 1 − learner 2){u}",
        "the smallest score difference worth finding (θ1), such as 0.01 in accuracy",
        Input::Number,
        Check::Finite,
    ),
    field(
        "sigma",
        "Expected standard deviation of the per-split differences, σ{u}",
        "the planning standard deviation of the per-split score differences (σ)",
        Input::Number,
        Check::Positive,
    ),
    optional(field("folds", "Folds of the cross-validation, k (10 for 10-fold)", "the folds k of k-fold cross-validation", Input::Whole, Check::Folds)),
    optional(field(
        "test_train_ratio",
        "Or, for repeated hold-out splits: test items per training item (0.25 for 80/20)",
        "the test items per training item in each split (n_test/n_train)",
        Input::Number,
        Check::TestShare,
    )),
];

const CLASSIFIERS: [Field; 3] = [
    field(
        "acc1",
        "Accuracy of classifier 1 that would matter, the share of test items it gets right (e.g. 0.85 or 85%)",
        "the accuracy of classifier 1 under the alternative",
        Input::Rate,
        Check::OpenUnit,
    ),
    field(
        "acc2",
        "Accuracy of classifier 2 (the null hypothesis says both are equal)",
        "the accuracy of classifier 2 under the alternative",
        Input::Rate,
        Check::OpenUnit,
    ),
    field(
        "discordant",
        "Share of test items where exactly one of the two is right (at least the gap between the accuracies)",
        "the expected share of test items where exactly one classifier is right",
        Input::Rate,
        Check::PositiveShare,
    ),
];

const TWO_PROPORTIONS: [Field; 3] = [
    field("p1", "Rate in group 1 that would matter, p1 (e.g. 0.30 or 30%)", "the rate in group 1 under the alternative (p1)", Input::Rate, Check::OpenUnit),
    field(
        "p2",
        "Rate in group 2, p2 (the null hypothesis says both are equal)",
        "the rate in group 2 under the alternative (p2)",
        Input::Rate,
        Check::OpenUnit,
    ),
    RATIO,
];

const fn data(key: &'static str, input: &'static str, label: &'static str, needed: &'static str, read: Input) -> Field {
    let check = if matches!(read, Input::Whole) { Check::Whole } else { Check::Finite };
    Field { key, input, label, needed, hint: needed, read, check, required: true }
}

const DATA_Z: [Field; 3] = [
    data("n", "data.n", "Number of measurements", "the number of measurements", Input::Whole),
    data("mean", "data.mean", "Mean{u}", "the mean of the data", Input::Number),
    // Accepted and not used: σ is known. Not shown on the page.
    optional(data("sd", "data.sd", "Standard deviation{u}", "the standard deviation of the data", Input::Number)),
];

const DATA_T: [Field; 3] = [DATA_Z[0], DATA_Z[1], data("sd", "data.sd", "Standard deviation{u}", "the standard deviation of the data", Input::Number)];

const DATA_PAIRED: [Field; 3] = [
    data("n", "data.n", "Number of pairs", "the number of pairs", Input::Whole),
    data("mean", "data.mean", "Mean of the differences{u}", "the mean of the differences", Input::Number),
    data("sd", "data.sd", "Standard deviation of the differences{u}", "the standard deviation of the differences", Input::Number),
];

const DATA_LEARNERS: [Field; 3] = [
    data("n", "data.n", "Number of splits, J", "the number of splits (J)", Input::Whole),
    data("mean", "data.mean", "Mean of the per-split differences{u}", "the mean of the per-split score differences", Input::Number),
    data("sd", "data.sd", "Standard deviation of the per-split differences{u}", "the standard deviation of the per-split score differences", Input::Number),
];

const DATA_TWO_MEANS: [Field; 6] = [
    data("n1", "data.n1", "Group 1: number of measurements", "the number of measurements in group 1", Input::Whole),
    data("mean1", "data.mean1", "Group 1: mean{u}", "the mean of group 1", Input::Number),
    data("sd1", "data.sd1", "Group 1: standard deviation{u}", "the standard deviation of group 1", Input::Number),
    data("n2", "data.n2", "Group 2: number of measurements", "the number of measurements in group 2", Input::Whole),
    data("mean2", "data.mean2", "Group 2: mean{u}", "the mean of group 2", Input::Number),
    data("sd2", "data.sd2", "Group 2: standard deviation{u}", "the standard deviation of group 2", Input::Number),
];

const DATA_PROPORTION: [Field; 2] = [
    data("successes", "data.successes", "Successes", "the number of successes", Input::Whole),
    data("trials", "data.trials", "Trials", "the number of trials", Input::Whole),
];

const DATA_TWO_PROPORTIONS: [Field; 4] = [
    data("successes1", "data.successes1", "Group 1: successes", "the successes in group 1", Input::Whole),
    data("trials1", "data.trials1", "Group 1: trials", "the trials in group 1", Input::Whole),
    data("successes2", "data.successes2", "Group 2: successes", "the successes in group 2", Input::Whole),
    data("trials2", "data.trials2", "Group 2: trials", "the trials in group 2", Input::Whole),
];

const DATA_CLASSIFIERS: [Field; 4] = [
    data("both_right", "data.both_right", "Test items both classifiers get right", "the number of items both classifiers get right", Input::Whole),
    data(
        "only_first_right",
        "data.only_first_right",
        "Items only classifier 1 gets right",
        "the number of items only classifier 1 gets right",
        Input::Whole,
    ),
    data(
        "only_second_right",
        "data.only_second_right",
        "Items only classifier 2 gets right",
        "the number of items only classifier 2 gets right",
        Input::Whole,
    ),
    data("both_wrong", "data.both_wrong", "Items both get wrong", "the number of items both classifiers get wrong", Input::Whole),
];

/// The registry, in the order the page offers the families and messages
/// list them.
pub const REGISTRY: [Entry; 10] = [
    Entry {
        family: Family::MeanZ,
        id: "mean_z",
        title: "one mean, known standard deviation (z test)",
        test: "one-sample z test with known standard deviation",
        approximation: None,
        kind: Kind::Means,
        chip: "One group’s mean, spread known",
        chip_note: "σ known from long experience (z test)",
        design: &KNOWN_MEAN,
        standardised: true,
        two_groups: false,
        discrete: false,
        n_min: 1,
        data: &DATA_Z,
        shape: Shape::One,
        estimate: "the sample mean",
        axis: "sample mean",
        null_words: None,
        parameter: "μ",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::MeanT,
        id: "mean_t",
        title: "one mean, unknown standard deviation (t test)",
        test: "one-sample t test",
        approximation: None,
        kind: Kind::Means,
        chip: "One group’s mean",
        chip_note: "against a fixed value; spread estimated from the data (t test)",
        design: &ONE_MEAN,
        standardised: true,
        two_groups: false,
        discrete: false,
        n_min: 2,
        data: &DATA_T,
        shape: Shape::One,
        estimate: "the sample mean",
        axis: "sample mean",
        null_words: None,
        parameter: "μ",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::PairedT,
        id: "paired_t",
        title: "paired means (t test on the differences)",
        test: "paired t test (one-sample t test on the differences)",
        approximation: None,
        kind: Kind::Means,
        chip: "Paired measurements",
        chip_note: "before and after on the same people (t test on the differences)",
        design: &PAIRED,
        standardised: true,
        two_groups: false,
        discrete: false,
        n_min: 2,
        data: &DATA_PAIRED,
        shape: Shape::Paired,
        estimate: "the mean difference",
        axis: "mean of the paired differences",
        null_words: None,
        parameter: "μd",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::TwoMeansPooled,
        id: "two_means_pooled",
        title: "two means, equal variances (pooled t test)",
        test: "two-sample t test, pooled variance",
        approximation: None,
        kind: Kind::Means,
        chip: "Two groups’ means",
        chip_note: "similar spread in both groups (pooled t test)",
        design: &POOLED,
        standardised: true,
        two_groups: true,
        discrete: false,
        n_min: 2,
        data: &DATA_TWO_MEANS,
        shape: Shape::TwoGroups,
        estimate: "the difference of means",
        axis: "difference of means, group 1 − group 2",
        null_words: None,
        parameter: "μ1 − μ2",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::TwoMeansWelch,
        id: "two_means_welch",
        title: "two means, unequal variances (Welch t test)",
        test: "Welch two-sample t test",
        approximation: Some("Welch–Satterthwaite degrees of freedom"),
        kind: Kind::Means,
        chip: "Two groups’ means, different spreads",
        chip_note: "Welch t test (approximate degrees of freedom)",
        design: &WELCH,
        standardised: false,
        two_groups: true,
        discrete: false,
        n_min: 2,
        data: &DATA_TWO_MEANS,
        shape: Shape::TwoGroups,
        estimate: "the difference of means",
        axis: "difference of means, group 1 − group 2",
        null_words: None,
        parameter: "μ1 − μ2",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::ProportionExact,
        id: "proportion_exact",
        title: "one proportion, exact binomial test",
        test: "exact binomial test",
        approximation: None,
        kind: Kind::Proportions,
        chip: "One proportion, exact",
        chip_note: "a count of successes out of n (binomial test)",
        design: &ONE_PROPORTION,
        standardised: false,
        two_groups: false,
        discrete: true,
        n_min: 1,
        data: &DATA_PROPORTION,
        shape: Shape::Binary,
        estimate: "the proportion",
        axis: "number of successes",
        null_words: None,
        parameter: "p",
        in_unit: false,
        counted: Some(("successes", "a proportion of")),
    },
    Entry {
        family: Family::ProportionNormal,
        id: "proportion_normal",
        title: "one proportion, normal approximation",
        test: "one-proportion z test",
        approximation: Some("normal approximation to the binomial, standard error from p0"),
        kind: Kind::Proportions,
        chip: "One proportion, approximate",
        chip_note: "normal approximation for large n",
        design: &ONE_PROPORTION,
        standardised: false,
        two_groups: false,
        discrete: false,
        n_min: 1,
        data: &DATA_PROPORTION,
        shape: Shape::Binary,
        estimate: "the proportion",
        axis: "sample proportion",
        null_words: None,
        parameter: "p",
        in_unit: false,
        counted: None,
    },
    Entry {
        family: Family::TwoProportions,
        id: "two_proportions",
        title: "two proportions, normal approximation",
        test: "two-proportion z test",
        approximation: Some("normal approximation, pooled standard error under H0, unpooled under the alternative"),
        kind: Kind::Proportions,
        chip: "Two groups’ proportions",
        chip_note: "normal approximation, pooled under H0",
        design: &TWO_PROPORTIONS,
        standardised: false,
        two_groups: true,
        discrete: false,
        n_min: 1,
        data: &DATA_TWO_PROPORTIONS,
        shape: Shape::TwoGroupsBinary,
        estimate: "the difference of proportions",
        axis: "difference of proportions, group 1 − group 2",
        null_words: Some("equal rates"),
        parameter: "p1 − p2",
        in_unit: false,
        counted: None,
    },
    Entry {
        family: Family::TwoLearnersCv,
        id: "two_learners_cv",
        title: "two learners compared over cross-validation splits (corrected resampled t)",
        test: "corrected resampled t test on the per-split score differences",
        approximation: Some("corrected resampled t: variance factor 1/J + n_test/n_train (Nadeau & Bengio 2003), noncentral t under the alternative"),
        kind: Kind::Models,
        chip: "Two models, cross-validated",
        chip_note: "scores of two learners on the same splits (corrected resampled t)",
        design: &LEARNERS,
        standardised: true,
        two_groups: false,
        discrete: false,
        n_min: 2,
        data: &DATA_LEARNERS,
        shape: Shape::Paired,
        estimate: "the mean score difference",
        axis: "mean score difference, learner 1 − learner 2",
        null_words: None,
        parameter: "μ_d",
        in_unit: true,
        counted: None,
    },
    Entry {
        family: Family::TwoClassifiers,
        id: "two_classifiers",
        title: "two classifiers compared on the same test items (exact conditional test on the discordant items)",
        test: "exact conditional test on the items where exactly one classifier is right (McNemar's exact test)",
        approximation: None,
        kind: Kind::Models,
        chip: "Two classifiers, same test items",
        chip_note: "right or wrong on each item, for both (also one group asked yes/no twice)",
        design: &CLASSIFIERS,
        standardised: false,
        two_groups: false,
        discrete: true,
        n_min: 1,
        data: &DATA_CLASSIFIERS,
        shape: Shape::PairedBinary,
        estimate: "the accuracy difference",
        axis: "items only classifier 1 gets right, of those where exactly one is right",
        null_words: Some("equal accuracy"),
        parameter: "accuracy 1 − accuracy 2",
        in_unit: false,
        counted: Some(("items only classifier 1 gets right", "an accuracy difference of")),
    },
];

impl Family {
    /// Every family, in the registry's order.
    pub const ALL: [Family; REGISTRY.len()] = {
        let mut all = [Family::MeanZ; REGISTRY.len()];
        let mut i = 0;
        while i < REGISTRY.len() {
            all[i] = REGISTRY[i].family;
            i += 1;
        }
        all
    };

    /// The family's registry entry.
    pub fn entry(self) -> &'static Entry {
        // The registry lists the families in the enum's order (a unit test
        // below checks it), so the discriminant is the entry's index.
        &REGISTRY[self as usize]
    }

    /// The identifier used in JSON input and output.
    pub fn id(self) -> &'static str {
        self.entry().id
    }

    pub fn from_id(id: &str) -> Option<Family> {
        REGISTRY.iter().find(|e| e.id == id).map(|e| e.family)
    }

    /// A plain description for messages and reports.
    pub fn title(self) -> &'static str {
        self.entry().title
    }

    pub fn two_groups(self) -> bool {
        self.entry().two_groups
    }

    pub fn discrete(self) -> bool {
        self.entry().discrete
    }

    /// Smallest n (per group) for which the statistic is defined.
    pub fn n_min(self) -> u64 {
        self.entry().n_min
    }

    /// Every family id, for messages ("one of mean_z, mean_t, ...").
    pub fn ids() -> String {
        REGISTRY.iter().map(|e| e.id).collect::<Vec<_>>().join(", ")
    }
}

impl Entry {
    /// The design fields this family accepts: its own, `d` where allowed,
    /// and the limits.
    pub fn accepts(&self, key: &str) -> bool {
        self.design.iter().any(|f| f.key == key) || (self.standardised && key == STANDARDISED.key) || LIMITS.iter().any(|f| f.key == key)
    }

    /// The design field of this family with this JSON name.
    pub fn design_field(&self, key: &str) -> Option<&'static Field> {
        self.design.iter().find(|f| f.key == key)
    }

    /// The summary-data field with this JSON name (without `data.`).
    pub fn data_field(&self, key: &str) -> Option<&'static Field> {
        self.data.iter().find(|f| f.key == key)
    }

    /// What this family takes, in words, for "does not apply" messages.
    pub fn takes(&self) -> String {
        let list = words(self.design.iter().map(|f| f.key));
        if self.standardised { format!("{} takes {list} (or d instead of theta0, theta1 and sigma)", self.id) } else { format!("{} takes {list}", self.id) }
    }

    /// The required summary fields in words ("successes and trials").
    pub fn data_keys(&self) -> String {
        words(self.data.iter().filter(|f| f.required).map(|f| f.key))
    }
}

/// "a, b and c".
fn words<'a>(items: impl Iterator<Item = &'a str>) -> String {
    let mut items: Vec<&str> = items.collect();
    let last = items.pop().unwrap_or_default();
    if items.is_empty() { last.to_string() } else { format!("{} and {last}", items.join(", ")) }
}

/// Every design field name the JSON contract knows (the union over the
/// registry, `d` and the limits), each once, in a stable order: what a
/// kept design, an exported file or a share link may hold besides
/// `family` and `alternative`.
pub fn design_keys() -> Vec<&'static str> {
    let mut keys: Vec<&'static str> = Vec::new();
    let all = REGISTRY.iter().flat_map(|e| e.design.iter()).chain([&STANDARDISED]).chain(LIMITS.iter());
    for f in all {
        if !keys.contains(&f.key) {
            keys.push(f.key);
        }
    }
    keys
}

/// Every summary-data field name over the registry, each once.
pub fn data_keys() -> Vec<&'static str> {
    let mut keys: Vec<&'static str> = Vec::new();
    for f in REGISTRY.iter().flat_map(|e| e.data.iter()) {
        if !keys.contains(&f.key) {
            keys.push(f.key);
        }
    }
    keys
}

/// A label with the unit put in: `{u}` becomes " (days)" or nothing.
pub fn label(field: &Field, unit: &str) -> String {
    let u = unit.trim();
    let u = if u.is_empty() { String::new() } else { format!(" ({u})") };
    field.label.replace("{u}", &u)
}

/// The README's table of families and their fields, generated from the
/// registry (a test checks the README carries exactly this text).
pub fn fields_table() -> String {
    let mut out = String::from("| family | test | design fields | summary data (`data`) | data-file roles |\n|---|---|---|---|---|\n");
    for e in &REGISTRY {
        let design: Vec<String> = e
            .design
            .iter()
            .map(|f| if f.required { format!("`{}`", f.key) } else { format!("`{}` (optional)", f.key) })
            .collect();
        let design = if e.standardised { format!("{}; `d` may replace `theta0`, `theta1`, `sigma`", design.join(", ")) } else { design.join(", ") };
        let data: Vec<String> = e.data.iter().map(|f| if f.required { format!("`{}`", f.key) } else { format!("`{}` (optional)", f.key) }).collect();
        let roles: Vec<String> = e.shape.roles().iter().map(|r| format!("`{}`", r.key())).collect();
        let approx = e.approximation.map_or(String::new(), |a| format!("; {a}"));
        out.push_str(&format!("| `{}` | {}{} | {} | {} | {} |\n", e.id, e.test, approx, design, data.join(", "), roles.join(", ")));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_family_has_one_entry_and_a_unique_id() {
        for (i, e) in REGISTRY.iter().enumerate() {
            assert_eq!(REGISTRY.iter().filter(|x| x.family == e.family).count(), 1, "{}", e.id);
            assert_eq!(REGISTRY.iter().filter(|x| x.id == e.id).count(), 1, "{}", e.id);
            assert_eq!(Family::from_id(e.id), Some(e.family));
            assert_eq!(e.family as usize, i, "{} stands out of the enum's order", e.id);
            assert_eq!(e.family.entry().id, REGISTRY[i].id);
        }
    }

    #[test]
    fn a_page_input_means_one_engine_field() {
        // Two families may share an input only for the same JSON field, so
        // that a value typed for one is read the same way by the other.
        let all: Vec<&Field> = REGISTRY.iter().flat_map(|e| e.design.iter().chain(e.data.iter())).collect();
        for a in &all {
            for b in &all {
                if a.input == b.input {
                    assert_eq!(a.key, b.key, "input {} is two fields", a.input);
                    assert_eq!(a.read, b.read, "input {} is read two ways", a.input);
                }
            }
        }
    }
}
