//! Byte keys of the index trees, big-endian so that byte order is time order.
//!
//! ```text
//! by_target   [kind: b'T' tank | b'S' system][id bytes][0x00][time: 8][record id: 16]
//! by_time     [time: 8][record id: 16]
//! corrections [superseded id: 16][correction id: 16]
//! ```
//!
//! `time` is milliseconds since the Unix epoch as an `i64` with the sign bit
//! flipped, big-endian, so earlier instants (even before 1970) sort first.
//! Target ids never contain 0x00 (control characters are refused), so the
//! separator ends the id unambiguously.

use ulid::Ulid;

use crate::model::record::Target;

/// Length of a ULID in bytes.
pub(crate) const ID_LEN: usize = 16;

/// Milliseconds as sortable bytes.
pub(crate) fn time_bytes(millis: i64) -> [u8; 8] {
    ((millis as u64) ^ (1 << 63)).to_be_bytes()
}

/// The inverse of [`time_bytes`].
#[cfg(test)]
pub(crate) fn millis_from_bytes(bytes: [u8; 8]) -> i64 {
    (u64::from_be_bytes(bytes) ^ (1 << 63)) as i64
}

/// `[kind][id][0x00]`: every key of one target starts with this.
pub(crate) fn target_prefix(target: &Target) -> Vec<u8> {
    let kind = match target {
        Target::Tank(_) => b'T',
        Target::System(_) => b'S',
    };
    let id = target.id().as_bytes();
    let mut key = Vec::with_capacity(2 + id.len() + 8 + ID_LEN);
    key.push(kind);
    key.extend_from_slice(id);
    key.push(0);
    key
}

/// The `by_target` key of a record.
pub(crate) fn target_key(target: &Target, millis: i64, id: Ulid) -> Vec<u8> {
    let mut key = target_prefix(target);
    key.extend_from_slice(&time_bytes(millis));
    key.extend_from_slice(&id.to_bytes());
    key
}

/// The `by_time` key of a record.
pub(crate) fn time_key(millis: i64, id: Ulid) -> [u8; 8 + ID_LEN] {
    let mut key = [0; 8 + ID_LEN];
    key[..8].copy_from_slice(&time_bytes(millis));
    key[8..].copy_from_slice(&id.to_bytes());
    key
}

/// The `corrections` key of a correction.
pub(crate) fn correction_key(superseded: Ulid, correction: Ulid) -> [u8; 2 * ID_LEN] {
    let mut key = [0; 2 * ID_LEN];
    key[..ID_LEN].copy_from_slice(&superseded.to_bytes());
    key[ID_LEN..].copy_from_slice(&correction.to_bytes());
    key
}

/// Inclusive bounds of the `by_target` keys of `target` between two instants.
pub(crate) fn target_bounds(target: &Target, (since, until): (i64, i64)) -> (Vec<u8>, Vec<u8>) {
    let prefix = target_prefix(target);
    let mut lo = prefix.clone();
    lo.extend_from_slice(&time_bytes(since));
    lo.extend_from_slice(&[0; ID_LEN]);
    let mut hi = prefix;
    hi.extend_from_slice(&time_bytes(until));
    hi.extend_from_slice(&[0xff; ID_LEN]);
    (lo, hi)
}

/// Inclusive bounds of the `by_time` keys between two instants.
pub(crate) fn time_bounds((since, until): (i64, i64)) -> ([u8; 8 + ID_LEN], [u8; 8 + ID_LEN]) {
    let mut lo = [0; 8 + ID_LEN];
    lo[..8].copy_from_slice(&time_bytes(since));
    let mut hi = [0xff; 8 + ID_LEN];
    hi[..8].copy_from_slice(&time_bytes(until));
    (lo, hi)
}

/// The record id at the end of an index key.
pub(crate) fn trailing_id(key: &[u8]) -> Option<Ulid> {
    let tail: [u8; ID_LEN] = key.get(key.len().checked_sub(ID_LEN)?..)?.try_into().ok()?;
    Some(Ulid::from_bytes(tail))
}

/// The `[time][id]` tail every `by_target` and `by_time` key ends with.
pub(crate) fn time_id_tail(key: &[u8]) -> Option<[u8; 8 + ID_LEN]> {
    key.get(key.len().checked_sub(8 + ID_LEN)?..)?.try_into().ok()
}

/// The ids of index keys, newest first, each once.
pub(crate) fn newest_first<'a>(index_keys: impl IntoIterator<Item = &'a [u8]>) -> Vec<Ulid> {
    let mut found: Vec<[u8; 8 + ID_LEN]> = index_keys.into_iter().filter_map(time_id_tail).collect();
    found.sort_unstable_by(|a, b| b.cmp(a));
    let mut ids: Vec<Ulid> = found.iter().filter_map(|tail| trailing_id(tail)).collect();
    let mut seen = std::collections::HashSet::with_capacity(ids.len());
    ids.retain(|id| seen.insert(*id));
    ids
}

/// A ULID from its 16 stored bytes.
pub(crate) fn id_from_bytes(bytes: &[u8]) -> Option<Ulid> {
    Some(Ulid::from_bytes(bytes.try_into().ok()?))
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #[test]
        fn time_bytes_sort_like_the_instants(a in any::<i64>(), b in any::<i64>()) {
            prop_assert_eq!(a.cmp(&b), time_bytes(a).cmp(&time_bytes(b)));
            prop_assert_eq!(millis_from_bytes(time_bytes(a)), a);
        }

        #[test]
        fn target_keys_sort_by_time_then_id(t1 in -10_000_000_000_000i64..10_000_000_000_000, t2 in -10_000_000_000_000i64..10_000_000_000_000, r1 in any::<u128>(), r2 in any::<u128>()) {
            let tank = Target::Tank("B2-07".into());
            let (a, b) = (Ulid(r1), Ulid(r2));
            prop_assert_eq!((t1, a).cmp(&(t2, b)), target_key(&tank, t1, a).cmp(&target_key(&tank, t2, b)));
            let (lo, hi) = target_bounds(&tank, (t1.min(t2), t1.max(t2)));
            for key in [target_key(&tank, t1, a), target_key(&tank, t2, b)] {
                prop_assert!(lo <= key && key <= hi);
            }
        }
    }

    #[test]
    fn one_target_never_reaches_into_another() {
        // "B2" is a prefix of "B2-07" as text; the 0x00 separator keeps their keys apart.
        let short = Target::Tank("B2".into());
        let long = Target::Tank("B2-07".into());
        let (lo, hi) = target_bounds(&short, (i64::MIN, i64::MAX));
        let other = target_key(&long, 0, Ulid::nil());
        assert!(!(lo <= other && other <= hi));
        let system = target_key(&Target::System("B2".into()), 0, Ulid::nil());
        assert!(!(lo <= system && system <= hi));
        assert_eq!(trailing_id(&target_key(&short, 5, Ulid(42))), Some(Ulid(42)));
    }

    #[test]
    fn before_1970_sorts_first() {
        assert!(time_bytes(-1) < time_bytes(0));
        assert!(time_key(-86_400_000, Ulid::max()) < time_key(0, Ulid::nil()));
    }
}
