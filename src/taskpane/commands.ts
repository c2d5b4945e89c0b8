/**
 * Function file named by the manifest (FunctionFile). Tailmark's ribbon button only opens the
 * task pane, so there are no functions to register; Office still loads this page.
 */
if (typeof Office !== 'undefined') {
  void Office.onReady();
}
export {};
