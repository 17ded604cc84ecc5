//! Output: tables, CSV, JSON, plots and the HTML report; every format reads the same result types.

pub mod plots;
