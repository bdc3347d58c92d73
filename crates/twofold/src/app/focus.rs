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

use egui::{Context, Event, Id, LayerId, Rect};

use crate::panels::widgets::{give_keyboard, take_preferred_first};

/// What the window remembers between frames about the keyboard.
#[derive(Debug, Default)]
pub(super) struct FocusKeeper {
    /// Frames left in which the keyboard follows the step's first control while the step's
    /// content arrives: the first frame of a new grid only measures it, and a search or an
    /// analysis finishing on another thread adds controls above the first one drawn. Ends at
    /// the engineer's first key, text or click, or when a pane gives a field the keyboard itself.
    armed: u8,
    /// The control the keeper gave the keyboard to while armed.
    placed: Option<Id>,
}

/// Frames the keeper follows a step's content for (the engineer's first input ends it sooner).
const FOLLOW_FRAMES: u8 = 60;

impl FocusKeeper {
    /// The step (or the whole project) changed.
    pub(super) fn step_changed(&mut self) {
        self.armed = FOLLOW_FRAMES;
        self.placed = None;
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
        if self.armed > 0 {
            let engineer_acted = ctx.input(|i| {
                i.events.iter().any(|e| {
                    matches!(
                        e,
                        Event::Key { pressed: true, .. }
                            | Event::Text(_)
                            | Event::Paste(_)
                            | Event::PointerButton { pressed: true, .. }
                    )
                })
            });
            // A pane gave one of its fields the keyboard (a name just added): leave it there.
            let pane_chose = focused != self.placed && focused.is_some_and(in_content);
            if engineer_acted || pane_chose {
                self.armed = 0;
                self.placed = None;
            } else {
                self.armed -= 1;
                let preferred = preferred.filter(|id| {
                    ctx.viewport(|v| v.this_pass.widgets.get(*id).is_some_and(|w| w.enabled))
                });
                if let Some(target) = preferred.or_else(|| first_control(ctx, layer, area))
                    && focused != Some(target)
                {
                    give_keyboard(ctx, target);
                    self.placed = Some(target);
                }
                return;
            }
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
