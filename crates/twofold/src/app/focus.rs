//! Where the keyboard goes, so a bench engineer never has to Tab through the menus again:
//!
//! - after the step changes (rail, shortcut, a button that moves on, a new or opened project),
//!   to the first control of the new step, unless the step gave a field the keyboard itself;
//! - after a click on a control of the step (a button, a check box), to that control, so the
//!   next Tab goes on from there rather than from the menu bar.
//!
//! It reads what egui recorded of the frame's widgets (their order, rectangles and whether they
//! take the keyboard), so a pane names its first control only when it is not the first drawn
//! ([`crate::panels::widgets::prefer_first`]).

use egui::{Context, Id, LayerId, Rect};

use crate::panels::widgets::take_preferred_first;

/// What the window remembers between frames about the keyboard.
#[derive(Debug, Default)]
pub(super) struct FocusKeeper {
    /// The step changed: give the keyboard to its first control once it is drawn (frames left
    /// to find one: the first frame of a new grid only measures it, with nothing to focus).
    to_content: u8,
}

impl FocusKeeper {
    /// The step (or the whole project) changed.
    pub(super) fn step_changed(&mut self) {
        self.to_content = 3;
    }

    /// Called once the step's content was drawn in `area` of `layer`, with no question shown.
    pub(super) fn after_content(&mut self, ctx: &Context, layer: LayerId, area: Rect) {
        let preferred = take_preferred_first(ctx);
        let focused = ctx.memory(|m| m.focused());
        let in_content = |id: Id| {
            ctx.viewport(|v| {
                v.this_pass
                    .widgets
                    .get(id)
                    .is_some_and(|w| w.layer_id == layer && area.intersects(w.rect))
            })
        };
        if self.to_content > 0 {
            self.to_content -= 1;
            if focused.is_some_and(in_content) {
                self.to_content = 0;
                return;
            }
            let preferred = preferred.filter(|id| {
                ctx.viewport(|v| v.this_pass.widgets.get(*id).is_some_and(|w| w.enabled))
            });
            if let Some(first) = preferred.or_else(|| first_control(ctx, layer, area)) {
                ctx.memory_mut(|m| m.request_focus(first));
                self.to_content = 0;
            }
            return;
        }
        // A click on a control of the step keeps the keyboard there.
        let clicked = ctx.viewport(|v| v.interact_widgets.clicked);
        if let Some(id) = clicked
            && focused != Some(id)
            && in_content(id)
            && ctx.viewport(|v| {
                v.this_pass
                    .widgets
                    .get(id)
                    .is_some_and(|w| w.enabled && w.sense.is_focusable())
            })
        {
            ctx.memory_mut(|m| m.request_focus(id));
        }
    }
}

/// The first enabled control in `area` of `layer` that takes the keyboard, in drawing order
/// (the order Tab follows).
fn first_control(ctx: &Context, layer: LayerId, area: Rect) -> Option<Id> {
    ctx.viewport(|v| {
        v.this_pass
            .widgets
            .get_layer(layer)
            .find(|w| {
                w.enabled && w.visible && w.sense.is_focusable() && area.contains_rect(w.rect)
            })
            .map(|w| w.id)
    })
}
