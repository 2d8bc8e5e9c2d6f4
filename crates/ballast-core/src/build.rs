//! Building a scheme for a method: the one place that maps [`Method`] to code.

use crate::explicit::{tableau, Dp853, ExplicitRk};
use crate::implicit;
use crate::method::Method;
use crate::options::SchemeOptions;
use crate::scheme::Scheme;
use crate::system::{Structure, System};

/// Why a scheme could not be built.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum BuildError {
    /// The method is not a single scheme (switching is the controller's job).
    #[error("{0} is not a single scheme; the switching controller builds its pair")]
    NotASingleScheme(Method),
    /// The options ask for something the system cannot give.
    #[error("invalid scheme options: {0}")]
    InvalidOptions(String),
}

/// Builds the scheme for `method` on a system of dimension `n` whose
/// Jacobian has `structure`. All work arrays are allocated here.
pub fn build<S: System>(
    method: Method,
    n: usize,
    structure: &Structure,
    opts: &SchemeOptions,
) -> Result<Box<dyn Scheme<S>>, BuildError> {
    let rk = |t: &'static tableau::Tableau| -> Result<Box<dyn Scheme<S>>, BuildError> {
        Ok(Box::new(ExplicitRk::new(t, n)))
    };
    let dirk =
        |t: &'static implicit::tableau::ImplicitTableau| -> Result<Box<dyn Scheme<S>>, BuildError> {
            Ok(Box::new(
                implicit::Dirk::new(t, n, structure, &opts.implicit)
                    .map_err(BuildError::InvalidOptions)?,
            ))
        };
    match method {
        Method::ForwardEuler => rk(&tableau::FORWARD_EULER),
        Method::Heun => rk(&tableau::HEUN),
        Method::Rk4 => rk(&tableau::RK4),
        Method::BogackiShampine32 => rk(&tableau::BOGACKI_SHAMPINE_32),
        Method::DormandPrince54 => rk(&tableau::DORMAND_PRINCE_54),
        Method::Tsitouras54 => rk(&tableau::TSITOURAS_54),
        Method::DormandPrince853 => {
            Ok(Box::new(Dp853::new(n).with_dense_output(opts.dense_output)))
        }
        Method::Adams => Ok(Box::new(crate::multistep::Adams::new(n))),
        Method::Bdf => Ok(Box::new(crate::multistep::Bdf::new(
            n,
            structure,
            &opts.implicit,
        )?)),
        Method::BackwardEuler => dirk(&implicit::tableau::BACKWARD_EULER),
        Method::Trapezoid => dirk(&implicit::tableau::TRAPEZOID),
        Method::TrBdf2 => dirk(&implicit::tableau::TR_BDF2),
        Method::Esdirk43 => dirk(&implicit::tableau::ESDIRK_43),
        Method::RadauIIA5 => Ok(Box::new(
            implicit::RadauIia5::new(n, structure, &opts.implicit)
                .map_err(BuildError::InvalidOptions)?,
        )),
        Method::Ros3p => Ok(Box::new(
            implicit::Rosenbrock::new(&implicit::tableau::ROS3P, n, structure, &opts.implicit)
                .map_err(BuildError::InvalidOptions)?,
        )),
        Method::Rosenbrock32 => Ok(Box::new(
            implicit::Rosenbrock::new(
                &implicit::tableau::ROSENBROCK_32,
                n,
                structure,
                &opts.implicit,
            )
            .map_err(BuildError::InvalidOptions)?,
        )),
        other => Err(BuildError::NotASingleScheme(other)),
    }
}
