//! The display lists of a session's views, kept while its scenario stays the same.
//!
//! A view's scene is a function of the scenario alone (its result is the scenario traced), so a
//! scene built once is drawn again as it is until the scenario changes: a resize, the colour
//! scheme, printing, the side view's plane or a field typed back to the same value redraws
//! without rebuilding, and so without recomputing the plots' curves (the split angle against
//! wavelength and incidence, the temperature sweeps), which are most of a redraw's work. A view
//! built together with its partner ([`crate::view::build_with_partner`]) leaves the partner's
//! scene here too. The scenario is compared by its canonical document text
//! ([`Scenario::to_json`]), which tells apart what `==` on numbers would not (−0 and +0), so a
//! kept scene is always the one a fresh build would give. The convergent-light views are not
//! kept here: their maps come from the page's worker and change without a new scenario.

use crate::contract::scenario::Scenario;
use crate::view::WithPartner;
use crate::view::scene::Scene;
use std::cell::RefCell;
use std::rc::Rc;

/// The scenes built for one scenario, by view name (none at first, for no scenario).
#[derive(Default)]
pub struct Scenes {
    scenario: String,
    built: RefCell<Vec<(String, Rc<Scene>)>>,
}

impl Scenes {
    /// Follows the session to `scenario`: the scenes kept stay only if it is the same document.
    pub fn follow(&mut self, scenario: &Scenario) {
        let text = scenario.to_json().to_string();
        if text != self.scenario {
            self.scenario = text;
            self.built.get_mut().clear();
        }
    }

    /// The scene of `view` if it was built for this scenario.
    pub fn find(&self, view: &str) -> Option<Rc<Scene>> {
        self.built
            .borrow()
            .iter()
            .find(|(name, _)| name == view)
            .map(|(_, scene)| Rc::clone(scene))
    }

    /// Keeps the scene built for `view`, and that of the view built alongside it if any;
    /// returns the first.
    pub fn keep(&self, view: &str, (scene, partner): WithPartner) -> Rc<Scene> {
        let scene = Rc::new(scene);
        let mut built = self.built.borrow_mut();
        built.push((view.to_string(), Rc::clone(&scene)));
        if let Some((name, other)) = partner {
            built.push((name.to_string(), Rc::new(other)));
        }
        scene
    }
}
