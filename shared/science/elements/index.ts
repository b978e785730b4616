export {
  type ElementInfo,
  getElement,
  getElementByNumber,
  getIsotope,
  type IsotopeInfo,
  isElementSymbol,
  listElements,
} from "./isotopes";
