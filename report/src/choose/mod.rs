//! Choosing formats. Today: facts about one format for questions at the
//! desk (`qbound describe`).

pub mod describe;
