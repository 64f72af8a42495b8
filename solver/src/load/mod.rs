//! External loads: follower pressure on element sides (with its load
//! stiffness), fluid pressure that penetrates where contact opens, and dead loads (total force on a set, body force) assembled into
//! a nodal force vector.

pub mod dead;
pub mod fluid;
pub mod follower;
pub mod pressure;
