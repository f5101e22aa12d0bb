/** Names of the curvature-fit methods users can choose. */
export const FIT_METHODS = ['parabola', 'fd3', 'fd5', 'poly4', 'kane'];
