//! placeholder root lib
