//! Exports for measure.sh: `run` (the JSON contract, what the page links
//! anyway) and, with the `table` feature, the data-file reader driven the
//! way the page drives it (one call per chunk).
#![allow(clippy::missing_safety_doc)]

#[unsafe(no_mangle)]
pub unsafe extern "C" fn run(ptr: *const u8, len: usize) -> usize {
    let s = unsafe { std::slice::from_raw_parts(ptr, len) };
    tern::engine::request::run(std::str::from_utf8(s).unwrap_or("")).map(|o| o.len()).unwrap_or(0)
}

#[unsafe(no_mangle)]
pub extern "C" fn alloc(len: usize) -> *mut u8 {
    let mut v = vec![0u8; len];
    let p = v.as_mut_ptr();
    std::mem::forget(v);
    p
}

#[cfg(feature = "table")]
mod table {
    use tern::engine::table::*;

    static mut LAST: Option<Table> = None;

    #[unsafe(no_mangle)]
    pub extern "C" fn builder_new(total: usize) -> *mut TableBuilder {
        let mut b = TableBuilder::new(ReadOptions::default());
        b.size_hint(total as u64);
        Box::into_raw(Box::new(b))
    }

    #[unsafe(no_mangle)]
    pub unsafe extern "C" fn builder_push(b: *mut TableBuilder, ptr: *const u8, len: usize) -> usize {
        let b = unsafe { &mut *b };
        let s = unsafe { std::slice::from_raw_parts(ptr, len) };
        usize::from(b.push(s).is_ok())
    }

    #[unsafe(no_mangle)]
    pub unsafe extern "C" fn builder_finish(b: *mut TableBuilder) -> usize {
        let b = unsafe { Box::from_raw(b) };
        match b.finish() {
            Ok(t) => {
                let n = t.n_rows + serde_json_len(&t);
                unsafe { LAST = Some(t) };
                n
            }
            Err(e) => e.to_string().len(),
        }
    }

    fn serde_json_len(t: &Table) -> usize {
        t.columns.len() + t.preview.len() + t.problems.total
    }

    /// Two groups (column 2 by column 1, levels A and B) and one column (3),
    /// with the chart data of the first group.
    #[unsafe(no_mangle)]
    pub extern "C" fn summarise_last() -> usize {
        #[allow(static_mut_refs)]
        let Some(t) = (unsafe { LAST.as_ref() }) else { return 0 };
        let m = Mapping::TwoGroups { value: 2, group: 1, level1: "A".into(), level2: "B".into() };
        let a = summarise(t, &m, &[]).map(|d| d.groups.len()).unwrap_or(0);
        let o = summarise(t, &Mapping::OneColumn { column: 3 }, &[]).map(|d| d.notes.len()).unwrap_or(0);
        let v = group_values(t, &m, &[]).unwrap_or_default();
        let c = v.first().map_or(0, |g| histogram(g).counts.len() + normal_quantile_points(g).len());
        a + o + c
    }

    #[unsafe(no_mangle)]
    pub extern "C" fn drop_last() {
        unsafe { LAST = None };
    }
}
