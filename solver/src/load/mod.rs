//! External loads: follower pressure on element sides (with its load
//! stiffness) and dead loads (total force on a set, body force) assembled into
//! a nodal force vector.

pub mod dead;
pub mod follower;
pub mod pressure;
