//! (stage under construction)
