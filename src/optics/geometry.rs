//! Planes, face frames and mount rotations: the geometry of faces at any angle.
//!
//! A face is a plane {r : n·r = d} with unit normal n pointing downstream (n_z > 0). Its *face
//! frame* has n as its z axis and x̂, ŷ carried by the smallest rotation that takes ẑ onto n,
//! the same construction as a beam's Jones basis ([`crate::optics::modes::beam_basis`]); the
//! matrix [`face_frame`] has those three unit vectors as columns, so it maps face-frame
//! coordinates to the lab frame and its transpose maps back. A mount is the same rotation for its
//! direction, about the element's axis point (CONVENTIONS.md, version 2).

use crate::optics::modes::beam_basis;
use crate::precision::ON_PLANE;
use nalgebra::{Matrix3, Vector3};

/// A plane in the lab frame, lengths in mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plane {
    /// Unit normal, pointing downstream (n_z > 0).
    pub normal: Vector3<f64>,
    /// A point of the plane.
    pub point: Vector3<f64>,
}

impl Plane {
    /// The plane z = `z`.
    pub fn across_z(z: f64) -> Plane {
        Plane {
            normal: Vector3::z(),
            point: Vector3::new(0.0, 0.0, z),
        }
    }

    /// Where the line from `from` along `dir` meets the plane: the distance s along `dir`
    /// (r = from + s·dir), or `None` when the line runs parallel to the plane or meets it behind
    /// `from` (by more than rounding, [`ON_PLANE`] of the distance scale); 0 when `from` lies on
    /// the plane to that rounding.
    pub fn meet(&self, from: Vector3<f64>, dir: Vector3<f64>) -> Option<f64> {
        let gap = self.normal.dot(&(self.point - from));
        let scale = 1.0 + (self.point - from).norm();
        // A point already on the plane (to rounding) meets it where it is, however the ray
        // runs: a ray leaving a face into a vanishing gap toward a coinciding face, near grazing,
        // would otherwise divide a rounding-sized gap by a tiny normal component.
        if gap.abs() <= ON_PLANE * scale {
            return Some(0.0);
        }
        let along = self.normal.dot(&dir);
        if along.abs() < 1e-15 {
            return None;
        }
        let s = gap / along;
        (s >= -ON_PLANE * scale).then_some(s.max(0.0))
    }

    /// Where the whole line through `from` along `dir` meets the plane, ahead or behind: the
    /// signed distance s along `dir`, or `None` when the line runs parallel to the plane. A
    /// screen is met so: the straight continuation of a ray, whichever side it lies on.
    pub fn meet_line(&self, from: Vector3<f64>, dir: Vector3<f64>) -> Option<f64> {
        let along = self.normal.dot(&dir);
        (along.abs() >= 1e-15).then(|| self.normal.dot(&(self.point - from)) / along)
    }
}

/// The rotation whose columns are the face frame's x, y and z (= `normal`) axes in the lab: the
/// smallest rotation taking ẑ onto `normal` (defined for normal_z > −1), which is also the
/// rotation of a mount whose direction is `normal`.
pub fn face_frame(normal: Vector3<f64>) -> Matrix3<f64> {
    let (e1, e2) = beam_basis(normal);
    Matrix3::from_columns(&[e1, e2, normal])
}

/// The unit vector (sin t cos a, sin t sin a, cos t) of polar angle `tilt` and azimuth `azimuth`,
/// radians.
pub fn direction(tilt: f64, azimuth: f64) -> Vector3<f64> {
    Vector3::new(tilt.sin() * azimuth.cos(), tilt.sin() * azimuth.sin(), tilt.cos())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn face_frames_are_rotations_that_carry_z_onto_the_normal() {
        for (t, a) in [(0.0, 0.0), (0.3, 1.1), (1.2, -2.0), (0.01, 3.0)] {
            let n = direction(t, a);
            let r = face_frame(n);
            assert!((r * Vector3::z() - n).norm() < 1e-15);
            assert!((r.transpose() * r - Matrix3::identity()).norm() < 1e-15);
            assert!((r.determinant() - 1.0).abs() < 1e-15);
            // Smallest rotation: the axis of rotation is perpendicular to both ẑ and n, so a
            // vector along ẑ × n is left where it is.
            let k = Vector3::z().cross(&n);
            if k.norm() > 0.0 {
                assert!((r * k - k).norm() < 1e-14);
            }
        }
    }

    #[test]
    fn lines_meet_planes_ahead_only() {
        let p = Plane {
            normal: direction(0.2, 0.0),
            point: Vector3::new(0.0, 0.0, 5.0),
        };
        let s = p.meet(Vector3::zeros(), Vector3::z()).unwrap();
        assert!((s - 5.0).abs() < 1e-12);
        assert_eq!(p.meet(Vector3::new(0.0, 0.0, 9.0), Vector3::z()), None);
        assert_eq!(p.meet(Vector3::zeros(), Vector3::y().cross(&p.normal)), None);
    }
}
