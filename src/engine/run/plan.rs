//! The schedule of one run (posting periods, compounding ends, ACT/ACT ICMA
//! reference periods, the last earning day), and a per-thread memo of it.
//!
//! Accounts of one product share their schedule terms, and most share an
//! opening day with many others, so the schedule rolled for one account is
//! kept (per thread) and handed to the next whose terms are the same. The
//! memo is keyed by every input of the schedule functions, so a figure can
//! never depend on whether a schedule was rolled or remembered; a schedule
//! that fails is never kept. The memo holds schedules only: this module
//! never reads files, the clock or the environment, and never prints.

use std::cell::RefCell;
use std::collections::HashMap;
use std::hash::{BuildHasherDefault, Hash, Hasher};
use std::rc::Rc;
use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::RunOptions;
use crate::conventions::calendar::Calendar;
use crate::conventions::daycount::Basis;
use crate::conventions::schedule::{month_end, Period, ScheduleTerms};
use crate::engine::error::EngineError;
use crate::engine::terms::AccountTerms;

/// The schedule of one run.
pub(super) struct Plan {
    /// Posting periods (a close's payment date already moved); empty when
    /// the account never posts.
    pub periods: Vec<Period>,
    /// Compounding ends and reference periods, shared with every account
    /// of the same schedule.
    pub shared: Rc<Shared>,
    /// The last earning day.
    pub last_day: NaiveDate,
    /// Empty buffers for the run's tier pieces and movement order.
    pub buffers: Buffers,
}

/// The parts of a schedule that a run only reads.
#[derive(Default)]
pub(super) struct Shared {
    periods: Vec<Period>,
    /// The last days of the compounding periods.
    pub compounding_ends: Vec<NaiveDate>,
    /// ACT/ACT ICMA reference periods `[start, end)`.
    pub references: Vec<(NaiveDate, NaiveDate)>,
}

/// Every input of the schedule functions for one run.
#[derive(Clone, PartialEq, Eq, Hash)]
struct Key {
    schedule: ScheduleTerms,
    calendar: CalendarKey,
    start: NaiveDate,
    open: NaiveDate,
    horizon: NaiveDate,
    compounding_months: Option<u32>,
    icma: bool,
}

/// A calendar in a key: equal when it is the same calendar or holds the
/// same name and holidays. Keeping the `Arc` keeps the calendar alive, so
/// its address is never reused while the memo holds it.
#[derive(Clone)]
struct CalendarKey(Arc<Calendar>);

impl PartialEq for CalendarKey {
    fn eq(&self, other: &Self) -> bool {
        Arc::ptr_eq(&self.0, &other.0) || *self.0 == *other.0
    }
}

impl Eq for CalendarKey {}

impl Hash for CalendarKey {
    fn hash<H: Hasher>(&self, state: &mut H) {
        self.0.name().hash(state);
    }
}

/// A multiply-rotate hash of the key's integers: the memo is looked up once
/// an account, where a cryptographic hash would cost as much as the schedule.
#[derive(Default)]
struct QuickHasher(u64);

impl Hasher for QuickHasher {
    fn finish(&self) -> u64 {
        self.0
    }

    fn write(&mut self, bytes: &[u8]) {
        for chunk in bytes.chunks(8) {
            let mut word = [0u8; 8];
            for (w, b) in word.iter_mut().zip(chunk) {
                *w = *b;
            }
            self.write_u64(u64::from_le_bytes(word));
        }
    }

    fn write_u64(&mut self, x: u64) {
        self.0 = (self.0.rotate_left(5) ^ x).wrapping_mul(0x517c_c1b7_2722_0a95);
    }

    fn write_u32(&mut self, x: u32) {
        self.write_u64(u64::from(x));
    }

    fn write_i32(&mut self, x: i32) {
        self.write_u64(u64::from(x.cast_unsigned()));
    }

    fn write_usize(&mut self, x: usize) {
        self.write_u64(x as u64);
    }

    fn write_isize(&mut self, x: isize) {
        self.write_u64(x as u64);
    }
}

/// Schedules remembered by one thread; cleared when it grows past this.
const MEMO_LIMIT: usize = 16_384;

thread_local! {
    static MEMO: RefCell<Memo> = RefCell::new(Memo::default());
}

/// What one thread keeps between runs: schedules by key, and the buffers
/// of the last run for the next to reuse.
#[derive(Default)]
struct Memo {
    schedules: HashMap<Key, Rc<Shared>, BuildHasherDefault<QuickHasher>>,
    spare: Buffers,
}

/// Buffers a run fills and empties again; kept so the next run of the
/// thread need not allocate them.
#[derive(Default)]
pub(super) struct Buffers {
    /// The posting periods.
    pub periods: Vec<Period>,
    /// The tier pieces of a base.
    pub pieces: Vec<(Decimal, Decimal)>,
    /// Movement indices by value date.
    pub order: Vec<usize>,
}

impl Plan {
    pub(super) fn new(terms: &AccountTerms, options: &RunOptions) -> Result<Plan, EngineError> {
        let open = terms.open_date;
        let start = terms.first_period_start();
        let schedule =
            schedule_terms(terms).ok_or(EngineError::Unsupported("a date out of range".into()))?;
        let last_day = last_day(terms, options.cutoff);
        if terms.basis == Basis::ActActIcma && terms.posting.per_year().is_none() {
            return Err(EngineError::Unsupported(format!(
                "ACT/ACT ICMA with posting {}: the basis needs a posting frequency (monthly, quarterly, semiannual or annual)",
                terms.posting.name()
            )));
        }
        let key = Key {
            schedule,
            calendar: CalendarKey(Arc::clone(&terms.calendar)),
            start,
            open,
            horizon: last_day.max(open),
            compounding_months: terms.compounding.months(),
            icma: terms.basis == Basis::ActActIcma,
        };
        let (shared, mut buffers) = MEMO.with(|memo| {
            let mut memo = memo.try_borrow_mut().ok();
            let found = memo
                .as_ref()
                .and_then(|m| m.schedules.get(&key).map(Rc::clone));
            let spare = memo
                .as_mut()
                .map(|m| std::mem::take(&mut m.spare))
                .unwrap_or_default();
            (found, spare)
        });
        let shared = match shared {
            Some(s) => s,
            None => {
                let s = Rc::new(roll(&key)?);
                MEMO.with(|memo| {
                    if let Ok(mut memo) = memo.try_borrow_mut() {
                        if memo.schedules.len() >= MEMO_LIMIT {
                            memo.schedules.clear();
                        }
                        memo.schedules.insert(key, Rc::clone(&s));
                    }
                });
                s
            }
        };
        let mut periods = std::mem::take(&mut buffers.periods);
        periods.clear();
        periods.extend_from_slice(&shared.periods);
        crate::engine::events::pay_on_close(&mut periods, terms, options.cutoff);
        buffers.pieces.clear();
        buffers.order.clear();
        Ok(Plan {
            periods,
            shared,
            last_day,
            buffers,
        })
    }

    /// Hands a run's buffers back for the thread's next run.
    pub(super) fn recycle(buffers: Buffers) {
        MEMO.with(|memo| {
            if let Ok(mut memo) = memo.try_borrow_mut() {
                memo.spare = buffers;
            }
        });
    }
}

/// The schedule of `key`, rolled from its anchor.
fn roll(key: &Key) -> Result<Shared, EngineError> {
    let schedule = &key.schedule;
    let calendar = &key.calendar.0;
    let periods = schedule.periods(key.start, key.open, key.horizon, calendar)?;
    let compounding_ends = match key.compounding_months {
        Some(m) => schedule.compounding_ends(m, key.open, key.horizon, calendar)?,
        None => Vec::new(),
    };
    let references = if key.icma {
        let to = periods
            .last()
            .map_or(key.horizon, |p| p.end.max(key.horizon));
        schedule.reference_periods(key.start.min(key.open), to)?
    } else {
        Vec::new()
    };
    Ok(Shared {
        periods,
        compounding_ends,
        references,
    })
}

/// The terms that fix `terms`' posting schedule: its anchor, else the month
/// end of its first period; `None` for a date out of range.
pub(crate) fn schedule_terms(terms: &AccountTerms) -> Option<ScheduleTerms> {
    let anchor = match terms.anchor {
        Some(a) => a,
        None => month_end(terms.first_period_start())?,
    };
    Some(ScheduleTerms {
        posting: terms.posting,
        anchor,
        anchor_kind: terms.anchor_kind,
        business_day: terms.business_day,
        maturity: terms.maturity,
        payment_delay_days: terms.payment_delay_days,
    })
}

/// The last day a run of `terms` to `cutoff` computes: the day before
/// maturity when that comes first.
pub(crate) fn last_day(terms: &AccountTerms, cutoff: NaiveDate) -> NaiveDate {
    match terms.maturity.and_then(|m| m.pred_opt()) {
        Some(m) if m < cutoff => m,
        _ => cutoff,
    }
}
