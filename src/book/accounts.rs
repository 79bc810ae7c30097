//! The Accounts sheet: one row per account, typed into the engine's
//! [`AccountTerms`] with the defaults of behaviour.md, Input books, and checked
//! against the account's own dates, its rate schedules and its calendar.
//!
//! An account with any error is kept out (its problems name it); nothing is
//! approximated: floating-rate terms that do not go together, or a floating
//! rate whose index has no fixings, are errors rather than a guessed rate.

use std::collections::{BTreeSet, HashMap};
use std::sync::Arc;
use std::sync::OnceLock;

use chrono::NaiveDate;
use rayon::prelude::*;
use rust_decimal::Decimal;

use super::fixings::{FixingsSheet, IndexLookup};
use super::holidays::{Calendars, Lookup};
use super::model::{AccountEntry, GlCodes};
use super::rates::Rates;
use super::sheet::Sheet;
use super::table::{near_miss, Ctx, Fields, Record, Table};
use super::tax::Taxes;
use crate::conventions::calendar::{BusinessDay, Calendar};
use crate::conventions::compounding::Compounding;
use crate::conventions::currency;
use crate::conventions::daycount::Basis;
use crate::conventions::names::fold;
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{month_end, AnchorKind, Posting};
use crate::engine::events::LifeEvents;
use crate::engine::shared::Shared;
use crate::engine::tax::TaxTerms;
use crate::engine::{AccountTerms, FloatingTerms, FloorOn, RateMethod, RoundAt, Side, TierMethod};
use crate::ids::IdIndex;
use crate::problem::{FollowOn, Position, Problem, Severity};
use crate::schema::{column, SheetKind, ACCOUNTS};

const ACCOUNT: usize = column!(ACCOUNTS, "account");
const CURRENCY: usize = column!(ACCOUNTS, "currency");
const DAY_COUNT: usize = column!(ACCOUNTS, "day_count");
const OPEN_DATE: usize = column!(ACCOUNTS, "open_date");
const OPENING_BALANCE: usize = column!(ACCOUNTS, "opening_balance");
const NAME: usize = column!(ACCOUNTS, "name");
const SIDE: usize = column!(ACCOUNTS, "side");
const COMPOUNDING: usize = column!(ACCOUNTS, "compounding");
const POSTING: usize = column!(ACCOUNTS, "posting");
const POSTING_ANCHOR: usize = column!(ACCOUNTS, "posting_anchor");
const ANCHOR_KIND: usize = column!(ACCOUNTS, "anchor_kind");
const CAPITALISE: usize = column!(ACCOUNTS, "capitalise");
const ROUND_AT: usize = column!(ACCOUNTS, "round_at");
const ROUND_MODE: usize = column!(ACCOUNTS, "round_mode");
const ROUND_PLACES: usize = column!(ACCOUNTS, "round_places");
const MATURITY: usize = column!(ACCOUNTS, "maturity");
const RATE_REF: usize = column!(ACCOUNTS, "rate_ref");
const DEBIT_RATE_REF: usize = column!(ACCOUNTS, "debit_rate_ref");
const TIER_METHOD: usize = column!(ACCOUNTS, "tier_method");
const CALENDAR: usize = column!(ACCOUNTS, "calendar");
const BUSINESS_DAY: usize = column!(ACCOUNTS, "business_day");
const PAYMENT_DELAY_DAYS: usize = column!(ACCOUNTS, "payment_delay_days");
const OPENING_ACCRUED: usize = column!(ACCOUNTS, "opening_accrued");
const PERIOD_START: usize = column!(ACCOUNTS, "period_start");
const RATE_METHOD: usize = column!(ACCOUNTS, "rate_method");
const LOOKBACK_DAYS: usize = column!(ACCOUNTS, "lookback_days");
const OBSERVATION_SHIFT: usize = column!(ACCOUNTS, "observation_shift");
const LOCKOUT_DAYS: usize = column!(ACCOUNTS, "lockout_days");
const SPREAD_COMPOUNDED: usize = column!(ACCOUNTS, "spread_compounded");
const FLOOR_ON: usize = column!(ACCOUNTS, "floor_on");
const GL_INTEREST: usize = column!(ACCOUNTS, "gl_interest");
const GL_ACCRUED: usize = column!(ACCOUNTS, "gl_accrued");
const GL_SETTLEMENT: usize = column!(ACCOUNTS, "gl_settlement");
const GL_PRIOR_PERIOD: usize = column!(ACCOUNTS, "gl_prior_period");
const TAX_REF: usize = column!(ACCOUNTS, "tax_ref");
const GL_TAX: usize = column!(ACCOUNTS, "gl_tax");
const GL_SUSPENSE: usize = column!(ACCOUNTS, "gl_suspense");
const GL_REVERSAL: usize = column!(ACCOUNTS, "gl_reversal");
const OPENING_SUSPENSE: usize = column!(ACCOUNTS, "opening_suspense");

/// The name of the Accounts column at place `i`, for messages.
fn column_name(i: usize) -> &'static str {
    ACCOUNTS.columns.get(i).map_or("", |c| c.name)
}

/// The most days a day-count column (payment delay, lookback, lockout) may hold.
const MAX_DAYS: u32 = 3650;

/// The most places daily interest may be rounded to.
const MAX_ROUND_PLACES: u32 = 12;

/// An account's dates, for the checks of other sheets' rows.
#[derive(Debug, Clone)]
pub(crate) struct Life {
    /// O, when it could be read.
    pub open: Option<NaiveDate>,
    /// M, when given.
    pub maturity: Option<NaiveDate>,
    /// X, the close_date, when given.
    pub close: Option<NaiveDate>,
    /// Whether a close before maturity is penalised.
    pub penalised: bool,
    /// The account's first row in the Accounts sheet.
    row: u32,
    /// Its side, when its row could be read.
    pub side: Option<Side>,
}

/// Every account id of the Accounts sheet (first row of each), with its
/// dates, for the rows of other sheets.
#[derive(Debug, Default)]
pub(crate) struct Known {
    /// The ids, by their place among the sheet's ids.
    ids: IdIndex,
    /// Each id's dates, by the same place.
    lives: Vec<Life>,
    /// Ids by folded id, to suggest the id a row probably meant: made the
    /// first time a row names an unknown id (a good book never needs it).
    folded: OnceLock<HashMap<String, String>>,
}

impl Known {
    /// Room for `ids` ids.
    fn with_capacity(ids: usize) -> Known {
        Known {
            ids: IdIndex::with_capacity(ids),
            lives: Vec::with_capacity(ids),
            ..Known::default()
        }
    }

    /// Holds account `id` with its dates (an id is held once: a second row
    /// of it is an error before it comes here); `false` when the sheet
    /// holds more ids than a book can ([`IdIndex::insert`]).
    fn insert(&mut self, id: &str, life: Life) -> bool {
        let Some(place) = self.ids.insert(id) else {
            return false;
        };
        match usize::try_from(place)
            .ok()
            .and_then(|p| self.lives.get_mut(p))
        {
            Some(held) => *held = life,
            None => self.lives.push(life),
        }
        true
    }

    /// The dates of account `id` (ids match exactly).
    pub(crate) fn get(&self, id: &str) -> Option<&Life> {
        let place = usize::try_from(self.ids.place(id)?).ok()?;
        self.lives.get(place)
    }

    /// The place of account `id` among the sheet's ids (its first row).
    pub(crate) fn place(&self, id: &str) -> Option<u32> {
        self.ids.place(id)
    }

    /// Ids by folded id; of ids that fold alike, the first in the sheet.
    fn folded(&self) -> &HashMap<String, String> {
        self.folded.get_or_init(|| {
            let mut first: HashMap<String, String> = HashMap::new();
            for id in self.ids.ids().iter() {
                first.entry(fold(id)).or_insert_with(|| id.to_string());
            }
            first
        })
    }

    /// The account a row of another sheet names in column `column`, with its
    /// dates; an unknown id is an error on that cell and gives `None`.
    pub(crate) fn of_row(
        &self,
        f: &mut Fields<'_, '_, '_>,
        column: usize,
    ) -> Option<(String, &Life)> {
        let id = f.required_text(column)?;
        f.account = Some(id.clone());
        match self.get(&id) {
            Some(life) => Some((id, life)),
            None => {
                f.report(
                    Severity::Error,
                    column,
                    &id,
                    "an account of the Accounts sheet",
                    &self.unknown_fix(&id),
                );
                None
            }
        }
    }

    /// The fix for a row naming an account that is not in the sheet.
    pub(crate) fn unknown_fix(&self, id: &str) -> String {
        match self.folded().get(&fold(id)) {
            Some(known) => format!("did you mean {known}? account ids match exactly; the row is not used"),
            None => "correct the account id, or add the account to the Accounts sheet; the row is not used".to_string(),
        }
    }
}

/// What the Accounts sheet gives.
#[derive(Debug, Default)]
pub(crate) struct Accounts {
    /// Accounts whose row had no error, in sheet order.
    pub entries: Vec<AccountEntry>,
    /// Every account id in the sheet.
    pub known: Known,
    /// Ids kept out by an error.
    pub rejected: BTreeSet<String>,
}

/// What an account's row needs from the rest of the book.
pub(crate) struct Others<'a> {
    /// The Rates sheet.
    pub rates: &'a Rates,
    /// The Holidays sheet.
    pub calendars: &'a Calendars,
    /// The Fixings sheet.
    pub fixings: &'a FixingsSheet,
    /// The Tax sheet.
    pub taxes: &'a Taxes,
}

/// Reads the Accounts sheet.
pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    others: &Others<'_>,
    problems: &mut Vec<Problem>,
) -> Option<Accounts> {
    let table = Table::open(&ctx, sheet, ACCOUNTS.columns, problems)?;
    let rows = sheet.rows_hint();
    let mut out = Accounts {
        entries: Vec::with_capacity(rows),
        known: Known::with_capacity(rows),
        ..Accounts::default()
    };
    let weekends = Arc::new(Calendar::weekends_only());
    let at = table.column_position(&ctx, ACCOUNT);
    // Rows are typed in blocks, each block's rows side by side (a row's
    // terms need nothing from another row), then taken in row order: a
    // second row of an id, and every problem, come out as one pass gives them.
    let mut records = table.records().peekable();
    while records.peek().is_some() {
        let block: Vec<Record<'_>> = records.by_ref().take(ROWS_PER_BLOCK).collect();
        let typed: Vec<Vec<TypedRow>> = block
            .par_chunks(ROWS_PER_TASK)
            .map(|recs| {
                // Accounts of one product mostly name the same GL codes: held once.
                let mut gl_codes: HashMap<GlCodes, Shared<GlCodes>> = HashMap::new();
                recs.iter()
                    .map(|rec| type_row(ctx, &table, rec, others, &weekends, &mut gl_codes, &at))
                    .collect()
            })
            .collect();
        for (row, rec) in typed.into_iter().flatten().zip(&block) {
            take_row(ctx, &table, rec, row, &mut out, problems);
        }
    }
    out.entries.shrink_to_fit();
    Some(out)
}

/// Rows of the Accounts sheet parsed at a time, then typed side by side.
const ROWS_PER_BLOCK: usize = 8_192;

/// Rows one task types in order (sharing its GL codes).
const ROWS_PER_TASK: usize = 512;

/// An Accounts row typed on its own: what it found before its id was
/// known, and, when it has an id, the account and what typing it found.
struct TypedRow {
    /// Problems of the id's cell.
    before: Vec<Problem>,
    /// The id, its typed account and the row's own problems.
    typed: Option<(String, Typed)>,
}

/// A row with an id, typed.
struct Typed {
    /// The account, `None` when a required term cannot be read.
    entry: Option<AccountEntry>,
    /// Whether the row had an error.
    failed: bool,
    /// The open date, when it could be read.
    open_date: Option<NaiveDate>,
    /// Problems found typing the row.
    problems: Vec<Problem>,
}

/// Types one row as if it were the only one (a second row of an id is
/// found when rows are taken, in [`take_row`]).
fn type_row(
    ctx: Ctx<'_>,
    table: &Table<'_>,
    rec: &Record<'_>,
    others: &Others<'_>,
    weekends: &Arc<Calendar>,
    gl_codes: &mut HashMap<GlCodes, Shared<GlCodes>>,
    at: &Arc<Position>,
) -> TypedRow {
    let mut before = Vec::new();
    let id = Fields::new(ctx, table, rec, &mut before).required_text(ACCOUNT);
    let Some(id) = id else {
        return TypedRow {
            before,
            typed: None,
        };
    };
    let mut problems = Vec::new();
    let mut f = Fields::new(ctx, table, rec, &mut problems);
    f.account = Some(id.clone());
    let entry = account(&mut f, &id, others, weekends, gl_codes, at);
    let open_date = entry.as_ref().map(|e| e.terms.open_date).or_else(|| {
        f.raw(OPEN_DATE)
            .and_then(|c| super::cell::date(c).ok().flatten())
    });
    let failed = f.failed;
    TypedRow {
        before,
        typed: Some((
            id,
            Typed {
                entry,
                failed,
                open_date,
                problems,
            },
        )),
    }
}

/// Takes a typed row in row order: its problems, its account, or the
/// error of a second row of an id (whose own typing is dropped unseen).
fn take_row(
    ctx: Ctx<'_>,
    table: &Table<'_>,
    rec: &Record<'_>,
    row: TypedRow,
    out: &mut Accounts,
    problems: &mut Vec<Problem>,
) {
    problems.extend(row.before);
    let Some((id, typed)) = row.typed else {
        return;
    };
    // An error on the row's id: the row is not used.
    let id_error = |problems: &mut Vec<Problem>, expected: &str, fix: &str| {
        let mut f = Fields::new(ctx, table, rec, problems);
        f.account = Some(id.clone());
        f.report(Severity::Error, ACCOUNT, &id, expected, fix);
    };
    if let Some(life) = out.known.get(&id) {
        let first = table.cell_ref(life.row, ACCOUNT);
        id_error(
            problems,
            &format!("each account once (it is already in {first})"),
            "remove the second row or give it its own account id; this row is not used",
        );
        return;
    }
    problems.extend(typed.problems);
    let entry = typed.entry;
    let held = out.known.insert(
        &id,
        Life {
            open: typed.open_date,
            maturity: entry.as_ref().and_then(|e| e.terms.maturity),
            close: entry.as_ref().and_then(|e| e.terms.events.close_date),
            penalised: entry.as_ref().is_some_and(|e| {
                e.terms.events.break_penalty != crate::engine::events::BreakPenalty::None
            }),
            row: rec.row,
            side: entry.as_ref().map(|e| e.terms.side),
        },
    );
    if !held {
        id_error(
            problems,
            "at most 4,294,967,294 account ids, with at most 4 GiB of id text, in one book",
            "split the accounts over several books (a run reads several at once); this row is not used",
        );
        return;
    }
    match entry {
        Some(e) if !typed.failed => out.entries.push(e),
        _ => {
            out.rejected.insert(id);
        }
    }
}

/// One account's row; `None` when a required term cannot be read.
fn account(
    f: &mut Fields<'_, '_, '_>,
    id: &str,
    others: &Others<'_>,
    weekends: &Arc<Calendar>,
    gl_codes: &mut HashMap<GlCodes, Shared<GlCodes>>,
    at: &Arc<Position>,
) -> Option<AccountEntry> {
    let currency = currency_of(f);
    let basis = f.required_named(DAY_COUNT, Basis::parse);
    let open_date = f.required_date(OPEN_DATE);
    let opening_balance = f.required_decimal(OPENING_BALANCE);
    let name = f.text(NAME).unwrap_or_default();
    let side = f.named(SIDE, Side::parse).unwrap_or_default();
    let compounding = f.named(COMPOUNDING, Compounding::parse);
    let posting = f.named(POSTING, Posting::parse);
    let anchor = f.date(POSTING_ANCHOR);
    let anchor_kind = f.named(ANCHOR_KIND, AnchorKind::parse).unwrap_or_default();
    let capitalise = f.yes_no(CAPITALISE).unwrap_or(false);
    let round_at = f.named(ROUND_AT, RoundAt::parse).unwrap_or_default();
    let round_mode = f.named(ROUND_MODE, RoundMode::parse).unwrap_or_default();
    let round_places = f.whole(ROUND_PLACES, 0, MAX_ROUND_PLACES);
    let maturity = f.date(MATURITY);
    let rate_ref = f.text(RATE_REF).unwrap_or_else(|| id.to_string());
    let debit_rate_ref = f.text(DEBIT_RATE_REF);
    let tier_method = f.named(TIER_METHOD, TierMethod::parse).unwrap_or_default();
    let calendar_name = f.text(CALENDAR);
    let business_day = f
        .named(BUSINESS_DAY, BusinessDay::parse)
        .unwrap_or_default();
    let payment_delay_days = f.whole(PAYMENT_DELAY_DAYS, 0, MAX_DAYS).unwrap_or(0);
    let opening_accrued = f.decimal(OPENING_ACCRUED).unwrap_or(Decimal::ZERO);
    let period_start = f.date(PERIOD_START);
    let gl = GlCodes {
        interest: f.text(GL_INTEREST),
        accrued: f.text(GL_ACCRUED),
        settlement: f.text(GL_SETTLEMENT),
        prior_period: f.text(GL_PRIOR_PERIOD),
        tax: f.text(GL_TAX),
        suspense: f.text(GL_SUSPENSE),
        reversal: f.text(GL_REVERSAL),
    };
    let gl = gl_codes
        .entry(gl)
        .or_insert_with_key(|gl| Shared::new(gl.clone()))
        .clone();
    let tax_ref = f.text(TAX_REF);
    let opening_suspense = f.decimal(OPENING_SUSPENSE).unwrap_or(Decimal::ZERO);
    if !opening_suspense.is_zero() && side == Side::Liability {
        f.report(
            Severity::Error,
            OPENING_SUSPENSE,
            &opening_suspense.to_string(),
            "no opening_suspense on a liability account (interest in suspense is asset side only)",
            "leave opening_suspense blank on a deposit, or correct the account's side to asset",
        );
    }
    let floating = floating_terms(f);

    let ((code, minor_units), basis, open_date, opening_balance) =
        (currency?, basis?, open_date?, opening_balance?);
    let compounding = compounding.unwrap_or_default();
    let posting = posting.unwrap_or_default();
    if opening_balance.is_sign_negative() && !opening_balance.is_zero() && debit_rate_ref.is_none()
    {
        warn_negative_opening(f, side, opening_balance);
    }

    let calendar = match calendar_name {
        Some(n) => calendar_of(f, &n, others.calendars).unwrap_or_else(|| Arc::clone(weekends)),
        None => {
            if basis == Basis::Bus252 {
                f.report(
                    Severity::Note,
                    DAY_COUNT,
                    basis.name(),
                    "a calendar for BUS/252 (business days / 252)",
                    "no calendar is named, so only Saturdays and Sundays are non-business days; name a Holidays calendar in calendar if the account has holidays",
                );
            }
            Arc::clone(weekends)
        }
    };

    let mut terms = AccountTerms {
        events: Shared::default(),
        floating,
        id: id.to_string(),
        currency: code,
        minor_units,
        side,
        basis,
        compounding,
        posting,
        anchor,
        anchor_kind,
        capitalise,
        round_at,
        round_mode,
        round_places,
        maturity,
        tier_method,
        calendar,
        business_day,
        payment_delay_days,
        open_date,
        opening_balance,
        opening_accrued,
        period_start,
        tax: tax_ref.and_then(|r| tax_terms(f, &r, others.taxes)),
    };
    let events = super::life_events::read(f, &terms, &rate_ref, others.rates);
    if events != LifeEvents::default() {
        terms.events = Shared::new(events);
    }
    check_terms(f, &terms);
    check_floating(f, &terms);
    check_rates(f, &terms, &rate_ref, debit_rate_ref.as_deref(), others);
    let position = f.row_position(ACCOUNT, at);
    Some(AccountEntry {
        terms,
        name,
        rate_ref,
        debit_rate_ref,
        gl,
        position,
        opening_suspense,
    })
}

/// The ISO 4217 code and its minor unit.
fn currency_of(f: &mut Fields<'_, '_, '_>) -> Option<(String, u32)> {
    let code = f.required_text(CURRENCY)?;
    match currency::lookup(&code) {
        Some(c) => match c.minor_units {
            Some(m) => Some((c.code.to_string(), m)),
            None => {
                f.report(
                    Severity::Error,
                    CURRENCY,
                    &code,
                    "a currency with a minor unit (ISO 4217 gives none for this code)",
                    "use the currency the account is kept in; amounts are rounded to its minor unit",
                );
                None
            }
        },
        None => {
            let fix = unknown_currency_fix(&code);
            f.report(
                Severity::Error,
                CURRENCY,
                &code,
                "an ISO 4217 currency code",
                &fix,
            );
            None
        }
    }
}

/// How to fix an unknown currency code: the code probably meant, else an
/// example of ISO 4217 codes.
pub(crate) fn unknown_currency_fix(code: &str) -> String {
    match currency::suggest(code) {
        Some(s) => format!("did you mean {s}? write the ISO 4217 code"),
        None => "write the ISO 4217 code, for example USD, EUR or JPY".to_string(),
    }
}

/// The account's calendar from Holidays; `None` after an error.
fn calendar_of(
    f: &mut Fields<'_, '_, '_>,
    name: &str,
    calendars: &Calendars,
) -> Option<Arc<Calendar>> {
    match calendars.lookup(name) {
        Lookup::Found(c) => Some(c),
        Lookup::Broken(cell) => {
            f.report(
                Severity::Error,
                CALENDAR,
                name,
                &format!("a calendar whose Holidays rows can be read (see Holidays!{cell})"),
                "correct the calendar's rows in the Holidays sheet",
            );
            None
        }
        Lookup::Unknown(near) => {
            let fix = match (near, calendars.read) {
                (Some(n), _) => format!("did you mean {n}? name a calendar of the Holidays sheet"),
                (None, true) => {
                    "add the calendar's holidays to the Holidays sheet, or correct the name"
                        .to_string()
                }
                (None, false) => {
                    "add a Holidays sheet (calendar, date, name) with the calendar's holidays"
                        .to_string()
                }
            };
            f.report(
                Severity::Error,
                CALENDAR,
                name,
                "a calendar named in the Holidays sheet",
                &fix,
            );
            None
        }
    }
}

/// The floating-rate columns (behaviour.md, Floating rates); blank ones take the
/// defaults of a fixed-rate account.
fn floating_terms(f: &mut Fields<'_, '_, '_>) -> FloatingTerms {
    FloatingTerms {
        method: f.named(RATE_METHOD, RateMethod::parse).unwrap_or_default(),
        lookback_days: f.whole(LOOKBACK_DAYS, 0, MAX_DAYS).unwrap_or(0),
        observation_shift: f.yes_no(OBSERVATION_SHIFT).unwrap_or(false),
        lockout_days: f.whole(LOCKOUT_DAYS, 0, MAX_DAYS).unwrap_or(0),
        spread_compounded: f.yes_no(SPREAD_COMPOUNDED).unwrap_or(false),
        floor_on: f.named(FLOOR_ON, FloorOn::parse).unwrap_or_default(),
    }
}

/// Floating-rate terms that do not go together are errors on the cell that
/// makes the combination; terms a fixed-rate account ignores are warnings.
fn check_floating(f: &mut Fields<'_, '_, '_>, t: &AccountTerms) {
    let fl = t.floating;
    let given = |f: &Fields<'_, '_, '_>, i: usize| f.given(i);
    if !fl.method.is_floating() {
        for i in [
            LOOKBACK_DAYS,
            OBSERVATION_SHIFT,
            LOCKOUT_DAYS,
            SPREAD_COMPOUNDED,
            FLOOR_ON,
        ] {
            if given(f, i) {
                let name = column_name(i);
                let shown = f.raw(i).map(|c| c.shown()).unwrap_or_default();
                f.report(
                    Severity::Warning,
                    i,
                    &shown,
                    &format!("{name} only with rate_method simple-daily or compounded-in-arrears"),
                    "the account has fixed rates, so the term has no effect: clear it, or set rate_method",
                );
            }
        }
        return;
    }
    let method = fl.method.name();
    let error = |f: &mut Fields<'_, '_, '_>, i: usize, expected: String, fix: &str| {
        let shown = f.raw(i).map(|c| c.shown()).unwrap_or_default();
        f.report(Severity::Error, i, &shown, &expected, fix);
    };
    match fl.method {
        RateMethod::CompoundedInArrears => {
            if !matches!(t.basis, Basis::Act360 | Basis::Act365F) {
                error(
                    f,
                    DAY_COUNT,
                    format!("ACT/360 or ACT/365F for rate_method {method}"),
                    "compounded-in-arrears is computed on ACT/360 or ACT/365F only: correct the day_count or the rate_method",
                );
            }
            if t.compounding != Compounding::Simple {
                error(
                    f,
                    COMPOUNDING,
                    format!(
                        "compounding simple for rate_method {method} (the rate itself compounds)"
                    ),
                    "clear compounding or set it to simple",
                );
            }
            if fl.floor_on == FloorOn::AllIn && !fl.spread_compounded {
                error(
                    f,
                    FLOOR_ON,
                    "floor_on index when the spread is added after compounding".to_string(),
                    "set spread_compounded yes to bound each day's index plus spread, or floor_on index",
                );
            }
            if fl.observation_shift && t.posting == Posting::None {
                error(
                    f,
                    OBSERVATION_SHIFT,
                    "a posting period for an observation shift".to_string(),
                    "an observation period is moved back from the period's end: give a posting frequency or clear observation_shift",
                );
            }
        }
        _ => {
            for i in [OBSERVATION_SHIFT, SPREAD_COMPOUNDED] {
                if f.yes_no(i) == Some(true) {
                    let name = column_name(i);
                    error(
                        f,
                        i,
                        format!("{name} only with rate_method compounded-in-arrears"),
                        "nothing compounds under simple-daily: clear the term, or set rate_method compounded-in-arrears",
                    );
                }
            }
        }
    }
    if fl.lockout_days > 0 && t.posting == Posting::None {
        error(
            f,
            LOCKOUT_DAYS,
            "a posting period for a lockout".to_string(),
            "a lockout counts back from the period's end: give a posting frequency or clear lockout_days",
        );
    }
}

/// Checks of one account's terms against each other.
fn check_terms(f: &mut Fields<'_, '_, '_>, t: &AccountTerms) {
    let open_cell = f.cell_ref(OPEN_DATE);
    if let Some(m) = t.maturity {
        if m <= t.open_date {
            f.report(
                Severity::Error,
                MATURITY,
                &m.to_string(),
                &format!(
                    "a maturity after the open_date {} ({open_cell})",
                    t.open_date
                ),
                "correct the maturity or the open_date",
            );
        }
    }
    if let Some(p) = t.period_start {
        if p > t.open_date {
            f.report(
                Severity::Error,
                PERIOD_START,
                &p.to_string(),
                &format!("a period_start on or before the open_date {} ({open_cell})", t.open_date),
                "period_start is where the period open on the open_date began: correct it, or leave it blank",
            );
        }
    }
    if t.posting == Posting::Maturity && t.maturity.is_none() {
        f.report(
            Severity::Error,
            POSTING,
            t.posting.name(),
            "a maturity for posting at maturity",
            "fill in maturity, or choose another posting frequency",
        );
    }
    if t.basis == Basis::ActActIcma && t.posting.per_year().is_none() {
        f.report(
            Severity::Error,
            DAY_COUNT,
            t.basis.name(),
            &format!(
                "a posting frequency for ACT/ACT ICMA (monthly, quarterly, semiannual or annual), not posting {}",
                t.posting.name()
            ),
            "ACT/ACT ICMA measures days against regular periods: give a periodic posting, or use another basis",
        );
    }
    if t.anchor.is_none()
        && matches!(
            t.posting,
            Posting::Quarterly | Posting::Semiannual | Posting::Annual
        )
    {
        let start = t.first_period_start();
        let anchor = month_end(start).map_or_else(String::new, |d| d.to_string());
        f.report(
            Severity::Warning,
            POSTING,
            t.posting.name(),
            &format!("a posting_anchor for a {} posting", t.posting.name()),
            &format!("without one, periods are counted from the month of {start} (anchor {anchor}); give posting_anchor to fix the schedule"),
        );
    }
    if let (Some(c), Some(p)) = (t.compounding.months(), t.posting.months()) {
        if c > p {
            f.report(
                Severity::Warning,
                COMPOUNDING,
                t.compounding.name(),
                &format!("compounding at least as often as posting ({})", t.posting.name()),
                "interest is posted before it compounds, so compounding has no effect between postings: check the terms",
            );
        }
    }
    if let Some(places) = t.round_places {
        if t.round_at == RoundAt::Posting {
            f.report(
                Severity::Note,
                ROUND_PLACES,
                &places.to_string(),
                "round_places with round_at daily",
                "round_places only applies when round_at is daily; posted amounts use the currency's minor unit",
            );
        } else if places < t.minor_units {
            f.report(
                Severity::Warning,
                ROUND_PLACES,
                &places.to_string(),
                &format!("at least the {} places of {}", t.minor_units, t.currency),
                "daily interest is rounded to fewer places than the currency's minor unit: check the terms",
            );
        }
    }
}

/// Checks of the account's rate schedules.
fn check_rates(
    f: &mut Fields<'_, '_, '_>,
    t: &AccountTerms,
    rate_ref: &str,
    debit: Option<&str>,
    others: &Others<'_>,
) {
    let col = if f.given(RATE_REF) { RATE_REF } else { ACCOUNT };
    schedule_check(f, t, rate_ref, col, others, Severity::Error);
    if let Some(d) = debit {
        schedule_check(f, t, d, DEBIT_RATE_REF, others, Severity::Warning);
    }
}

/// Whether `rate_ref` names a usable schedule in force on the open date.
/// A late start is `late` (an error for the account's own rates, a warning
/// for debit rates, which apply only on overdrawn days).
fn schedule_check(
    f: &mut Fields<'_, '_, '_>,
    t: &AccountTerms,
    rate_ref: &str,
    col: usize,
    others: &Others<'_>,
    late: Severity,
) {
    let rates = others.rates;
    if !floating_check(f, t, rate_ref, col, others) {
        return;
    }
    if col != DEBIT_RATE_REF
        && t.floating.method.is_floating()
        && rates.schedules.contains_key(rate_ref)
    {
        let shown = f.raw(RATE_METHOD).map(|c| c.shown()).unwrap_or_default();
        f.report(
            Severity::Error,
            RATE_METHOD,
            &shown,
            &format!("a rate_ref whose Rates rows name an index for rate_method {} ({rate_ref} gives fixed rates only)", t.floating.method.name()),
            "name the index (with spread_bp, floor_percent, cap_percent) in the Rates rows, or set rate_method fixed",
        );
        return;
    }
    if let Some(cell) = rates.broken.get(rate_ref) {
        f.report(
            Severity::Error,
            col,
            rate_ref,
            &format!("a rate schedule without errors (see Rates!{cell})"),
            "correct the schedule's rows in the Rates sheet",
        );
        return;
    }
    let Some((first, cell)) = rates.first.get(rate_ref) else {
        unknown_rate_ref(f, rate_ref, col, rates);
        return;
    };
    if *first > t.open_date {
        let open_cell = f.cell_ref(OPEN_DATE);
        f.report(
            late,
            OPEN_DATE,
            &t.open_date.to_string(),
            &format!(
                "a rate of {rate_ref} in force on the open_date ({open_cell}); its first rate takes effect on {first} (Rates!{cell})"
            ),
            "a rate that starts after the account opens leaves days without a rate: add an earlier rate row or correct the dates",
        );
    }
}

/// Checks of `rate_ref` when it names a floating schedule: a debit rate
/// cannot follow an index, the account's rate_method must say how the index
/// accrues, and each index needs fixings. `false` when the schedule cannot
/// be used at all, so nothing more is checked.
fn floating_check(
    f: &mut Fields<'_, '_, '_>,
    t: &AccountTerms,
    rate_ref: &str,
    col: usize,
    others: &Others<'_>,
) -> bool {
    let rates = others.rates;
    let Some(schedule) = rates.floating.get(rate_ref) else {
        return true;
    };
    let cell = rates
        .floating_cell
        .get(rate_ref)
        .cloned()
        .unwrap_or_default();
    if col == DEBIT_RATE_REF {
        f.report(
            Severity::Error,
            col,
            rate_ref,
            &format!("a fixed debit rate schedule (Rates!{cell} names an index)"),
            "debit rates that follow an index are not computed: give the debit_rate_ref fixed rates",
        );
        return false;
    }
    if !t.floating.method.is_floating() {
        let shown = f.raw(RATE_METHOD).map(|c| c.shown()).unwrap_or_default();
        f.report(
            Severity::Error,
            RATE_METHOD,
            &shown,
            &format!("rate_method simple-daily or compounded-in-arrears for {rate_ref}, whose Rates!{cell} names an index"),
            "set rate_method to how the index accrues, or give the rate_ref fixed rates",
        );
        return false;
    }
    for index in schedule.indices() {
        let fix = match others.fixings.lookup(index) {
            IndexLookup::Found => continue,
            IndexLookup::Broken(at) => {
                format!("correct the {index} rows of the Fixings sheet (see Fixings!{at})")
            }
            IndexLookup::Unknown(Some(near)) => format!(
                "did you mean {near}? index names match exactly: correct Rates!{cell} or add {index} fixings to the Fixings sheet"
            ),
            IndexLookup::Unknown(None) if others.fixings.read => {
                format!("add the {index} fixings to the Fixings sheet (index, date, rate_percent)")
            }
            IndexLookup::Unknown(None) => format!(
                "add a Fixings sheet (index, date, rate_percent) with the {index} fixings"
            ),
        };
        f.report(
            Severity::Error,
            col,
            rate_ref,
            &format!(
                "a rate_ref whose index {index} (Rates!{cell}) has fixings on the Fixings sheet"
            ),
            &fix,
        );
    }
    true
}

/// The warning for an opening balance below zero on an account without a
/// debit rate: balances are positive in the account's normal direction, so
/// the account earns nothing until movements bring it above zero. A
/// deposit typed as a credit (negative, as a ledger shows it) is the usual
/// cause.
fn warn_negative_opening(f: &mut Fields<'_, '_, '_>, side: Side, balance: Decimal) {
    let shown = f
        .raw(OPENING_BALANCE)
        .map_or_else(|| balance.to_string(), |c| c.shown());
    let (what, fix) = match side {
        Side::Liability => (
            "a deposit balance of zero or more (balances are positive in the account's normal direction)",
            format!(
                "a deposit opening at {balance} earns nothing: write {} if that is what the customer holds; if the account opens overdrawn, name its overdraft rate in debit_rate_ref",
                -balance
            ),
        ),
        Side::Asset => (
            "a loan balance of zero or more (balances are positive in the account's normal direction)",
            format!(
                "a loan opening at {balance} earns nothing: write {} if that is what the customer owes; if the loan opens overpaid, name its rate in debit_rate_ref",
                -balance
            ),
        ),
    };
    f.report(Severity::Warning, OPENING_BALANCE, &shown, what, &fix);
}

/// The error for a `rate_ref` (in column `col`) with no rows in the Rates
/// sheet, naming the likeliest meant one.
fn unknown_rate_ref(f: &mut Fields<'_, '_, '_>, rate_ref: &str, col: usize, rates: &Rates) {
    let which = if col == DEBIT_RATE_REF {
        "debit_rate_ref"
    } else {
        "rate_ref"
    };
    // Refs match exactly; one that differs only in case or spacing is
    // the likeliest meaning.
    let key = fold(rate_ref);
    let near = rates
        .first
        .keys()
        .find(|k| fold(k) == key)
        .or_else(|| rates.first.keys().find(|k| near_miss(&key, &fold(k))));
    let fix = match (near, rates.read) {
        (Some(n), _) => format!(
            "did you mean {n}? add rows for {rate_ref} to the Rates sheet, or correct {which}"
        ),
        (None, true) => {
            format!("add rows for {rate_ref} to the Rates sheet, or correct {which}")
        }
        (None, false) if rates.sheet.is_none() => {
            format!("add a Rates sheet with rows for {rate_ref}")
        }
        (None, false) => {
            format!("correct the Rates sheet (see its own problems); it needs rows for {rate_ref}")
        }
    };
    f.report(
        Severity::Error,
        col,
        rate_ref,
        &format!("a {which} with rows in the Rates sheet"),
        &fix,
    );
    if !rates.read {
        // Every account naming a rate_ref meets this; the Rates sheet's own
        // problem is the one to fix.
        let label = SheetKind::Rates.label();
        f.follows(|book| match &rates.sheet {
            Some(name) => FollowOn::unreadable_sheet(book, label, name),
            None => FollowOn::missing_sheet(book, label),
        });
    }
}

/// The withholding tax an account's `tax_ref` names (behaviour.md,
/// Withholding tax); an unknown or broken `tax_ref` is an error on the cell.
fn tax_terms(f: &mut Fields<'_, '_, '_>, tax_ref: &str, taxes: &Taxes) -> Option<TaxTerms> {
    if let Some(schedule) = taxes.schedules.get(tax_ref) {
        return Some(TaxTerms {
            schedule: Arc::clone(schedule),
        });
    }
    if let Some(cell) = taxes.broken.get(tax_ref) {
        f.report(
            Severity::Error,
            TAX_REF,
            tax_ref,
            &format!(
                "a tax_ref whose Tax rows can be read ({tax_ref} has a bad row at Tax!{cell})"
            ),
            "correct the Tax row named; the account is not computed until then",
        );
        return None;
    }
    let key = fold(tax_ref);
    let near = taxes
        .schedules
        .keys()
        .find(|k| fold(k) == key || near_miss(&key, &fold(k)));
    let fix = match (near, taxes.read) {
        (Some(n), _) => format!("did you mean {n}? add a Tax row for {tax_ref}, or correct tax_ref"),
        (None, true) => format!("add a Tax row for {tax_ref} (tax_ref, effective, rate_percent), or clear tax_ref if the account bears no tax"),
        (None, false) => format!("add a Tax sheet with a row for {tax_ref} (tax_ref, effective, rate_percent), or clear tax_ref if the account bears no tax"),
    };
    f.report(
        Severity::Error,
        TAX_REF,
        tax_ref,
        "a tax_ref of the Tax sheet",
        &fix,
    );
    None
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::cell::NumberStyle;
    use crate::book::rates;
    use crate::book::sheet::text_sheet;
    use crate::schema::IfBlank;
    use crate::schema::SheetKind;

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    fn read_accounts(rows: &[&[&str]]) -> (Option<Accounts>, Vec<Problem>) {
        let mut problems = Vec::new();
        let rate_sheet = text_sheet(
            SheetKind::Rates,
            &[
                &[
                    "rate_ref",
                    "effective",
                    "rate_percent",
                    "index",
                    "spread_bp",
                ],
                &["STD", "2026-01-01", "2", "", ""],
                &["std-2", "2026-01-01", "2", "", ""],
                &["FLT", "2026-01-01", "", "HVM-ON", "150"],
                &["FLT-X", "2026-01-01", "", "HVM-0N", "150"],
            ],
        );
        let rates = rates::read(ctx(), &rate_sheet, &mut problems);
        let calendars = Calendars::default();
        let fixing_sheet = text_sheet(
            SheetKind::Fixings,
            &[
                &["index", "date", "rate_percent"],
                &["HVM-ON", "2026-11-02", "4.31"],
            ],
        );
        let fixings = crate::book::fixings::read(ctx(), &fixing_sheet, &mut problems);
        let others = Others {
            rates: &rates,
            calendars: &calendars,
            fixings: &fixings,
            taxes: &crate::book::tax::Taxes::default(),
        };
        let sheet = text_sheet(SheetKind::Accounts, rows);
        let found = read(ctx(), &sheet, &others, &mut problems);
        (found, problems)
    }

    const HEADER: &[&str] = &[
        "account",
        "currency",
        "day_count",
        "open_date",
        "opening_balance",
        "rate_ref",
        "calendar",
    ];

    #[test]
    fn a_calendar_without_a_holidays_sheet_says_to_add_one() {
        let (found, problems) = read_accounts(&[
            HEADER,
            &[
                "HM-SAV-601",
                "USD",
                "ACT/365F",
                "2026-01-01",
                "10",
                "STD",
                "HM-HOLIDAYS",
            ],
        ]);
        let found = found.unwrap();
        assert!(found.entries.is_empty());
        assert!(found.rejected.contains("HM-SAV-601"));
        assert_eq!(problems.len(), 1);
        assert_eq!(problems[0].position.cell, "G2");
        assert!(
            problems[0].fix.contains("add a Holidays sheet"),
            "{}",
            problems[0].fix
        );
    }

    /// Found: a deposit opening at -25000.00 (a credit, as a ledger shows
    /// it) accrued nothing without a word. Expected: a warning at the
    /// opening_balance cell that says it earns nothing and gives the
    /// positive amount; the account is still computed. With a debit rate
    /// the negative balance is meant, and nothing is said.
    #[test]
    fn a_negative_opening_balance_on_a_deposit_is_warned_at_its_cell() {
        let header: Vec<&str> = HEADER
            .iter()
            .copied()
            .chain(["side", "debit_rate_ref"])
            .collect();
        let (found, problems) = read_accounts(&[
            &header,
            &[
                "HM-SAV-610",
                "USD",
                "ACT/365F",
                "2026-01-01",
                "-25000.00",
                "STD",
                "",
                "liability",
                "",
            ],
            &[
                "HM-CHK-611",
                "USD",
                "ACT/365F",
                "2026-01-01",
                "-300.00",
                "STD",
                "",
                "liability",
                "STD",
            ],
        ]);
        assert_eq!(found.unwrap().entries.len(), 2);
        assert_eq!(problems.len(), 1, "{problems:#?}");
        let p = &problems[0];
        assert_eq!(
            (p.severity, p.position.cell.as_str()),
            (Severity::Warning, "E2")
        );
        assert_eq!(p.found, "-25000.00");
        assert!(
            p.expected.starts_with("a deposit balance of zero or more"),
            "{}",
            p.expected
        );
        assert!(
            p.fix
                .starts_with("a deposit opening at -25000.00 earns nothing: write 25000.00"),
            "{}",
            p.fix
        );
    }

    #[test]
    fn a_rate_ref_in_another_case_is_suggested_not_taken() {
        let (found, problems) = read_accounts(&[
            HEADER,
            &["HM-SAV-602", "USD", "ACT/365F", "2026-01-01", "10", "STD-2"],
        ]);
        assert!(found.unwrap().entries.is_empty());
        assert_eq!(problems.len(), 1);
        assert_eq!(problems[0].position.cell, "F2");
        assert!(
            problems[0].fix.contains("did you mean std-2"),
            "{}",
            problems[0].fix
        );
    }

    #[test]
    fn a_missing_required_value_is_an_error_naming_the_column() {
        let (found, problems) = read_accounts(&[
            HEADER,
            &["HM-SAV-603", "USD", "", "2026-01-01", "10", "STD"],
        ]);
        assert!(found.unwrap().entries.is_empty());
        assert_eq!(problems.len(), 1);
        assert_eq!(problems[0].position.cell, "C2");
        assert_eq!(problems[0].found, "");
        assert!(problems[0].expected.contains("day_count"));
    }

    #[test]
    fn an_account_with_the_defaults_only() {
        let (found, problems) = read_accounts(&[
            HEADER,
            &["HM-SAV-604", "JPY", "ACT/365F", "2026-01-01", "1000", "STD"],
        ]);
        assert!(problems.is_empty(), "{problems:?}");
        let found = found.unwrap();
        let t = &found.entries[0].terms;
        assert_eq!((t.currency.as_str(), t.minor_units), ("JPY", 0));
        assert_eq!(
            (t.side, t.posting, t.compounding),
            (Side::Liability, Posting::Monthly, Compounding::Simple)
        );
        assert_eq!(
            (t.round_at, t.round_mode, t.tier_method),
            (RoundAt::Posting, RoundMode::HalfUp, TierMethod::Whole)
        );
        assert_eq!(
            (t.business_day, t.anchor_kind, t.capitalise),
            (BusinessDay::Unadjusted, AnchorKind::End, false)
        );
        assert_eq!(found.entries[0].name, "");
    }

    /// A blank cell means what the book schema says: an account whose row
    /// writes every defaulted column at its default reads as the same
    /// account as one that leaves those columns out.
    #[test]
    fn blank_cells_mean_the_schema_defaults() {
        let defaults: Vec<(&str, &str)> = ACCOUNTS
            .columns
            .iter()
            .filter_map(|c| match c.if_blank {
                IfBlank::Means(v) => Some((c.name, v)),
                _ => None,
            })
            .collect();
        assert!(defaults.len() >= 15, "{defaults:?}");
        let read_row = |extra: &[(&str, &str)]| {
            let mut header = HEADER[..6].to_vec();
            header.extend(extra.iter().map(|d| d.0));
            let mut row = vec!["HM-SAV-605", "USD", "ACT/365F", "2026-01-01", "1000", "STD"];
            row.extend(extra.iter().map(|d| d.1));
            let (found, problems) = read_accounts(&[&header, &row]);
            let errors: Vec<&Problem> = problems
                .iter()
                .filter(|p| p.severity == Severity::Error)
                .collect();
            assert!(errors.is_empty(), "{errors:?}");
            let entries = found.unwrap().entries;
            assert_eq!(entries.len(), 1);
            format!("{entries:?}")
        };
        assert_eq!(read_row(&[]), read_row(&defaults));
    }

    #[test]
    fn rate_methods_by_name() {
        assert_eq!(RateMethod::parse("Fixed"), Ok(RateMethod::Fixed));
        assert_eq!(
            RateMethod::parse("compounded in arrears"),
            Ok(RateMethod::CompoundedInArrears)
        );
        assert_eq!(
            RateMethod::parse("simple_daly").unwrap_err().suggestion,
            Some("simple-daily")
        );
    }

    const FLOATING_HEADER: &[&str] = &[
        "account",
        "currency",
        "day_count",
        "open_date",
        "opening_balance",
        "rate_ref",
        "rate_method",
        "lookback_days",
        "observation_shift",
    ];

    /// Floating rates: a floating account reads its method, lookback and shift.
    #[test]
    fn a_floating_account_reads_its_terms() {
        let (found, problems) = read_accounts(&[
            FLOATING_HEADER,
            &[
                "HVM-L1",
                "USD",
                "ACT/360",
                "2026-11-02",
                "1000000",
                "FLT",
                "compounded-in-arrears",
                "5",
                "yes",
            ],
        ]);
        assert!(problems.is_empty(), "{problems:?}");
        let fl = found.unwrap().entries[0].terms.floating;
        assert_eq!(fl.method, RateMethod::CompoundedInArrears);
        assert_eq!((fl.lookback_days, fl.observation_shift), (5, true));
    }

    /// Floating rates: an index without fixings is an error on the account, with
    /// the near miss suggested; rates naming an index need a floating method;
    /// compounding in arrears needs ACT/360 or ACT/365F.
    #[test]
    fn floating_terms_that_cannot_be_computed_are_errors() {
        let (found, problems) = read_accounts(&[
            FLOATING_HEADER,
            &[
                "HVM-L2",
                "USD",
                "ACT/360",
                "2026-11-02",
                "1",
                "FLT-X",
                "simple-daily",
                "",
                "",
            ],
            &[
                "HVM-L3",
                "USD",
                "ACT/360",
                "2026-11-02",
                "1",
                "FLT",
                "fixed",
                "",
                "",
            ],
            &[
                "HVM-L4",
                "USD",
                "30/360",
                "2026-11-02",
                "1",
                "FLT",
                "compounded-in-arrears",
                "",
                "",
            ],
            &[
                "HVM-L5",
                "USD",
                "ACT/360",
                "2026-11-02",
                "1",
                "FLT",
                "simple-daily",
                "",
                "yes",
            ],
        ]);
        assert!(found.unwrap().entries.is_empty());
        let cells: Vec<&str> = problems.iter().map(|p| p.position.cell.as_str()).collect();
        assert_eq!(cells, ["F2", "G3", "C4", "I5"]);
        assert!(
            problems[0].fix.contains("did you mean HVM-ON"),
            "{}",
            problems[0].fix
        );
        assert!(problems[2].expected.contains("ACT/360 or ACT/365F"));
    }
}
