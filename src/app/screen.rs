//! The plane <-> screen map of a drawing area for one frame: a scene
//! [`Transform`] placed at a rectangle of the window. The canvas (z) and
//! the central-charge plane (Z) each have one.

use crate::scene::{Transform, View};
use eframe::egui::{Pos2, Rect, Vec2};
use num_complex::Complex64;

#[derive(Clone, Copy, Debug)]
pub struct ScreenTransform {
    pub rect: Rect,
    pub scene: Transform,
}

impl ScreenTransform {
    pub fn new(rect: Rect, view: &View) -> Self {
        Self::placing(rect, Transform::of_view(view, rect.width(), rect.height()))
    }

    /// A scene's own transform, with its pixel (0, 0) at `rect.min`.
    pub fn placing(rect: Rect, scene: Transform) -> Self {
        Self { rect, scene }
    }

    pub fn to_screen(&self, z_in_plane: Complex64) -> Pos2 {
        let [x, y] = self.scene.to_screen(z_in_plane);
        self.rect.min + Vec2::new(x, y)
    }

    pub fn to_plane(&self, pos_in_screen: Pos2) -> Complex64 {
        let p = pos_in_screen - self.rect.min;
        self.scene.to_plane([p.x, p.y])
    }

    pub fn pixels_per_unit(&self) -> f64 {
        self.scene.pixels_per_unit()
    }

    /// The part of the plane this transform shows.
    pub fn scene_view(&self) -> View {
        View {
            center: self.scene.center,
            half_width: self.scene.half_width,
        }
    }
}

/// `view` zoomed by `factor` about the plane point under `pos_in_screen`.
pub fn zoomed(view: &View, tf: &ScreenTransform, pos_in_screen: Pos2, factor: f64) -> View {
    let z = tf.to_plane(pos_in_screen);
    let half = (view.half_width / factor).clamp(1e-6, 1e7);
    let f = view.half_width / half;
    let c = Complex64::new(view.center[0], view.center[1]);
    let c = z - (z - c) / f;
    View {
        center: [c.re, c.im],
        half_width: half,
    }
}

/// `view` moved with a drag of `delta` pixels.
pub fn panned(view: &View, tf: &ScreenTransform, delta: Vec2) -> View {
    let ppu = tf.pixels_per_unit();
    View {
        center: [
            view.center[0] - f64::from(delta.x) / ppu,
            view.center[1] + f64::from(delta.y) / ppu,
        ],
        half_width: view.half_width,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn transform_round_trips() {
        let tf = ScreenTransform::new(
            Rect::from_min_size(Pos2::new(100.0, 50.0), Vec2::new(800.0, 600.0)),
            &View {
                center: [1.0, -2.0],
                half_width: 4.0,
            },
        );
        let z = Complex64::new(0.3, -1.7);
        let back = tf.to_plane(tf.to_screen(z));
        assert!((back - z).norm() < 1e-5);
        assert_eq!(
            tf.to_screen(Complex64::new(1.0, -2.0)),
            Pos2::new(500.0, 350.0)
        );
    }
}
